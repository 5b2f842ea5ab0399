/**
 * Wires the page together: the bridge to the host, the document store, the
 * grid, the toolbar and the status line.
 */
import type { DocumentPayload } from '../src-shared/api';
import { matrixFromPayload } from '../src-shared/apiCodec';
import { formatProblem } from '../src-shared/io/problem';
import { ApiCallError, type HostBridge } from './bridge/hostBridge';
import { installEditing, type Editing } from './editing/installEditing';
import { RatingGrid } from './grid/ratingGrid';
import { afterPaint } from './panels/afterPaint';
import { mountCellPanel } from './panels/cellPanel';
import { mountCenteringPanel } from './panels/centeringPanel';
import { mountTuningPanel } from './panels/tuningPanel';
import { createExportDialog } from './panels/exportDialog';
import { createReportDialog } from './panels/reportDialog';
import { StudyRecord } from './report/studyRecord';
import { ModelPanel } from './panels/modelPanel';
import { Notice } from './panels/notice';
import type { PanelContext } from './panels/panelContext';
import { mountRunsPanel } from './panels/runsPanel';
import { SidePanel } from './panels/sidePanel';
import { renderStatusLine } from './panels/statusLine';
import { syncGridWithRuns } from './grid/gridSync';
import { installRunPersistence } from './editing/runPersistence';
import { FitController } from './runs/fitController';
import { fillAdaptively } from './runs/firstFill';
import { RunStore } from './runs/runStore';
import { CommandRegistry } from './commands/commandRegistry';
import { commandHandlers } from './commands/commandHandlers';
import { installShortcuts } from './commands/shortcuts';
import { helpDialog } from './dialogs/helpDialog';
import { sampleDialog } from './dialogs/sampleDialog';
import { DocumentStore } from './state/documentStore';
import { SettingsStore } from './state/settingsStore';
import { ViewStore } from './state/viewStore';

const byTestId = <T extends HTMLElement>(id: string): T => {
  const el = document.querySelector<T>(`[data-testid="${id}"]`);
  if (!el) throw new Error(`page is missing [data-testid=${id}]`);
  return el;
};

export interface App extends PanelContext {
  openDocument(doc: DocumentPayload): void;
  exportDialog: { open(): Promise<void> };
  reportDialog: { open(): Promise<void> };
  editing: Editing;
  commands: CommandRegistry;
}

export async function startApp(bridge: HostBridge, styleNonce: string): Promise<App> {
  const notice = new Notice(byTestId('notice'));
  const store = new DocumentStore({
    rowLabels: [],
    colLabels: [],
    values: new Float64Array(0),
    scale: { min: 1, max: 5, step: 1 },
  });
  const grid = new RatingGrid(byTestId('grid'), {
    store,
    styleNonce,
    onRefused: (message) => notice.show(message, 'error'),
    // The focused cell lives in the view store; the Cell tab follows it.
    onCellFocused: (row, col) => view.set({ focused: { row, col } }),
  });
  // Unless a width is remembered, the side panel takes about a quarter of the window (between 280 and 360 px).
  const view = new ViewStore(window.localStorage, Math.min(360, Math.max(280, Math.round(window.innerWidth * 0.27))));
  const settings = new SettingsStore();
  const runs = new RunStore(view);
  const controller = new FitController(bridge, store, runs);

  const info = await bridge.call('app.info', {});
  const hostLine =
    info.host === 'electron' ? `Rankfill ${info.version}` : `Rankfill ${info.version} · browser host (loopback only)`;
  const statusRoot = byTestId('status-line');
  const refreshStatus = () => {
    const shown = runs.shown;
    const mean =
      shown && Number.isFinite(shown.result.globalMean) ? ` · global mean ${shown.result.globalMean.toFixed(2)}` : '';
    renderStatusLine(statusRoot, store.current, hostLine + mean);
    byTestId('doc-title').textContent = `${store.title}${store.dirty ? ' •' : ''}`;
    document.title = `${store.title} — Rankfill`;
  };
  store.subscribe(refreshStatus);
  runs.subscribe(refreshStatus);

  // Side panel: model, runs, cell details, centering comparison, tuning.
  const side = new SidePanel(byTestId('side-panel'), view);
  const modelRoot = side.add('model', 'Model');
  const runsRoot = side.add('runs', 'Runs');
  const cellRoot = side.add('cell', 'Cell');
  const centeringRoot = side.add('centering', 'Centering');
  const tuningRoot = side.add('tuning', 'Tuning');
  // Fill: the first Fill of a data set chooses its settings from the data unless the user set them (runs/firstFill.ts).
  const fill = (): void =>
    void fillAdaptively({
      controller,
      settings,
      runs,
      store,
      onChoosing: (state, cancel) => model.showChoosing(state, cancel),
      onFailed: (message) => model.showChoiceFailed(message),
    });
  const model: ModelPanel = new ModelPanel(modelRoot, { controller, settings, view, fill });
  view.subscribe((changed) => {
    if (changed.has('overlayVisible')) grid.setLayers({ overlayVisible: view.state.overlayVisible });
  });
  const record = new StudyRecord(store);
  const ctx: PanelContext = { bridge, store, runs, controller, grid, notice, settings, view, side, record };
  mountRunsPanel(runsRoot, ctx);
  const cellPanel = mountCellPanel(cellRoot, ctx);
  view.subscribe((changed) => {
    const f = view.state.focused;
    if (changed.has('focused') && f) cellPanel.focus(f.row, f.col);
  });
  mountCenteringPanel(centeringRoot, ctx);
  mountTuningPanel(tuningRoot, ctx);
  syncGridWithRuns(ctx);
  installRunPersistence(ctx);
  runs.subscribe((e) => {
    const r = runs.shown;
    if (!r) {
      // No run shown (another data set was opened): the Model tab shows none of the old one.
      if (e.type === 'shown' || e.type === 'runs')
        afterPaint('model-trace', () => (runs.shown ? undefined : model.showNoRun()));
      return;
    }
    if (!(e.type === 'shown' || (e.type === 'updated' && e.id === r.id))) return;
    afterPaint('model-trace', () => showTrace(r));
  });
  const showTrace = (r: NonNullable<typeof runs.shown>) => {
    const res = r.result;
    const last = res.objectiveTrace[res.objectiveTrace.length - 1];
    model.showRunTrace(
      res.objectiveTrace,
      `Run ${r.id}: ${res.iterations} iterations, ${res.converged ? 'settled' : 'stopped at the limit'}, ` +
        `${res.settings.model === 'gaussian' ? 'log-likelihood' : 'objective'} ${Number.isFinite(last) ? last.toPrecision(6) : '—'}, ${Math.round(res.elapsedMs)} ms` +
        (r.refits ? ` · refitted after ${r.refits} edit${r.refits === 1 ? '' : 's'}` : ''),
    );
  };
  const exportDialog = createExportDialog(ctx, info.version);
  byTestId('export-button').addEventListener('click', () => void exportDialog.open());
  const reportDialog = createReportDialog(ctx, record, info.version);
  byTestId('report-button').addEventListener('click', () => void reportDialog.open());

  const openDocument = (doc: DocumentPayload) => {
    store.replace(matrixFromPayload(doc.matrix), doc.title, doc.source);
    if (doc.warnings.length) notice.show(doc.warnings.map(formatProblem).join('\n'), 'info', 10000);
  };

  // Sample picker
  const picker = byTestId<HTMLSelectElement>('sample-picker');
  const { samples } = await bridge.call('samples.list', {});
  // Shown while the open document is not one of the samples (an import or a project).
  const otherOption = new Option('(your own data)', '');
  otherOption.disabled = true;
  picker.append(otherOption);
  for (const s of samples) {
    const opt = document.createElement('option');
    opt.value = s.id;
    opt.textContent = s.title;
    opt.title = s.description;
    picker.append(opt);
  }
  let editing: Editing | undefined;
  let pickedSample = '';
  store.subscribe((e) => {
    if (e.type !== 'replaced') return;
    pickedSample = store.source.kind === 'sample' ? store.source.name : '';
    picker.value = pickedSample;
  });
  const openSample = (id: string): Promise<void> =>
    (editing ? editing.confirmLeave('Opening a sample set') : Promise.resolve(true))
      .then((go) => {
        if (go) return bridge.call('samples.open', { id });
        picker.value = pickedSample; // stayed: the picker shows what is open
        return undefined;
      })
      .then((doc) => {
        if (!doc) return;
        pickedSample = id;
        openDocument(doc);
      })
      .catch((err: unknown) => void notice.show(messageOf(err), 'error'));
  picker.addEventListener('change', () => void openSample(picker.value));

  // Editing, import with preview, project files and autosave (editing/installEditing.ts).
  editing = installEditing({
    bridge,
    store,
    grid,
    notice,
    gridHost: byTestId('grid'),
    editBar: byTestId('edit-bar'),
    importInput: byTestId<HTMLInputElement>('import-file'),
    openDocument,
    runCommand: (id, index) => commands.run(id, index),
  });

  // One command registry for the menu, the shortcuts and the edit bar (commands/).
  const importInput = byTestId<HTMLInputElement>('import-file');
  const ed = editing;
  const commands = new CommandRegistry(
    commandHandlers({
      edit: ed.commands,
      files: {
        save: () => ed.files.save(),
        saveAs: () => ed.files.saveAs(),
        open: () => ed.files.open(),
        openRecent: (i) => ed.files.openRecent(i),
        clearRecent: () => bridge.call('recent.clear', {}),
        closeRequested: () => ed.files.closeRequested(),
      },
      chooseSample: async () => {
        const id = await sampleDialog(samples, pickedSample);
        if (id) await openSample(id);
      },
      chooseImportFile: () => importInput.click(),
      openExport: () => exportDialog.open(),
      openReport: () => reportDialog.open(),
      toggleOverlay: () => view.set({ overlayVisible: !view.state.overlayVisible }),
      toggleSidePanel: () => view.setLayout({ sideCollapsed: !view.state.layout.sideCollapsed }),
      fill: () => fill(),
      showTab: (tab) => side.select(tab),
      showGuide: () => helpDialog(),
    }),
    (id, err) => notice.show(`${id}: ${messageOf(err)}`, 'error'),
  );
  bridge.on('menu.command', ({ command }) => void commands.runWire(command));
  byTestId('import-button').addEventListener('click', () => commands.run('file.import'));
  installShortcuts(commands, () => ed.isEditing());

  // First start: open the first sample.
  if (samples.length > 0) {
    picker.value = pickedSample = samples[0].id;
    openDocument(await bridge.call('samples.open', { id: samples[0].id }));
  }
  refreshStatus();
  void editing.files.offerRecovery();
  return { ...ctx, openDocument, exportDialog, reportDialog, editing, commands };
}

export function messageOf(err: unknown): string {
  if (err instanceof ApiCallError) return err.message;
  return err instanceof Error ? err.message : String(err);
}
