/**
 * The export dialog: which layout, how filled values are rounded, the
 * delimiter, the settings sidecar, and where the file goes. The text is built
 * here with the shared writers; the main side writes it atomically.
 */
import { runTitle } from './runsPanel';
import type { Delimiter } from '../../src-shared/io/detectDelimiter';
import {
  ESTIMATE_CAUTION,
  buildExport,
  buildMask,
  buildSidecar,
  sidecarIntervals,
  matrixFingerprintText,
  type ExportKind,
  type ExportOptions,
} from '../../src-shared/io/exportFilled';
import { observedCount } from '../../src-shared/matrix/ratingMatrix';
import { confirmDialog } from '../dialogs/modal';
import { runFitsDocument } from '../runs/runMatch';
import { intervalsOfRun } from '../runs/runIntervals';
import { el, field, numberInput } from './dom';
import type { PanelContext } from './panelContext';
import { sha256Hex } from './sha256';

const KIND_WORDS: Record<ExportKind, [string, string]> = {
  'filled-wide': ['Filled matrix', 'observed ratings plus estimates in the blank cells, one row per row label'],
  'estimates-wide': ['Estimates only', 'only the filled cells; observed cells left blank'],
  long: [
    'Long layout',
    'one line per cell: row, column, value, source (observed or filled), baseline, spread, and the interval’s lower and upper bounds at the level set in the Model tab',
  ],
};

const DECIMALS_KEY = 'rankfill.export.decimals';

function rememberedDecimals(): string {
  try {
    const v = localStorage.getItem(DECIMALS_KEY);
    return v === null ? '2' : v;
  } catch {
    return '2';
  }
}

function rememberDecimals(v: string): void {
  try {
    localStorage.setItem(DECIMALS_KEY, v);
  } catch {
    // storage refused: the choice lasts for this page only
  }
}

export function createExportDialog(ctx: PanelContext, appVersion: string): { open(): Promise<void> } {
  const dialog = el('dialog', { className: 'rf-dialog', testid: 'export-dialog' });
  document.body.append(dialog);

  const kind = el('select', { testid: 'export-kind' });
  for (const k of Object.keys(KIND_WORDS) as ExportKind[]) kind.append(new Option(KIND_WORDS[k][0], k));
  const kindNote = el('p', { className: 'rf-hint' });
  const roundStep = el('input', { testid: 'export-round' });
  roundStep.type = 'checkbox';
  const decimals = numberInput('export-decimals', 2, { min: 0, max: 10, step: 1 });
  // Two decimals by default; the last choice is remembered (blank = full precision).
  decimals.value = rememberedDecimals();
  decimals.placeholder = 'full';
  decimals.addEventListener('change', () => rememberDecimals(decimals.value.trim()));
  const mask = el('input', { testid: 'export-mask' });
  mask.type = 'checkbox';
  mask.checked = false;
  const delimiter = el('select', { testid: 'export-delimiter' });
  delimiter.append(new Option('comma', ','), new Option('semicolon', ';'), new Option('tab', '\t'));
  const sidecar = el('input', { testid: 'export-sidecar' });
  sidecar.type = 'checkbox';
  sidecar.checked = true;
  const formulaGuard = el('input', { testid: 'export-formula-guard' });
  formulaGuard.type = 'checkbox';
  formulaGuard.checked = true;
  const path = el('input', { testid: 'export-path' });
  path.type = 'text';
  path.spellcheck = false;
  const status = el('p', { className: 'rf-hint', testid: 'export-status' });
  const write = el('button', { className: 'rf-button rf-primary', testid: 'export-write' }, ['Write file']);
  const cancel = el('button', { className: 'rf-button', testid: 'export-cancel' }, ['Close']);
  const runLine = el('p', { className: 'rf-hint', testid: 'export-run' });

  const updateKind = () => (kindNote.textContent = KIND_WORDS[kind.value as ExportKind][1]);
  kind.addEventListener('change', updateKind);
  updateKind();

  dialog.append(
    el('h2', {}, ['Write out the filled matrix']),
    runLine,
    el('p', { className: 'rf-caution', testid: 'export-caution' }, [ESTIMATE_CAUTION]),
    field('Layout', kind),
    kindNote,
    field('Round estimates to the scale step', roundStep),
    field(
      'Decimals for estimates',
      decimals,
      'Blank keeps full precision. Observed ratings are always written as they are.',
    ),
    field('Delimiter', delimiter),
    field(
      'Protect labels from spreadsheet formulas',
      formulaGuard,
      'A label starting with = + - or @ gets a leading apostrophe, so a spreadsheet shows it as text instead of running it. Numbers are never changed.',
    ),
    field(
      'Also write a mask file (wide layouts)',
      mask,
      'NAME.mask.csv beside the export: the same rows and columns, each cell “observed” or “filled”, so every estimate is marked cell by cell.',
    ),
    field(
      'Also write a settings file',
      sidecar,
      'NAME.settings.json beside the export: settings, seed, errors, app version, time and a hash of the input.',
    ),
    el('label', { className: 'rf-form-field rf-wide' }, [el('span', { className: 'rf-form-label' }, ['File']), path]),
    status,
    el('div', { className: 'rf-row' }, [write, cancel]),
  );

  cancel.addEventListener('click', () => dialog.close());

  const doWrite = async (overwrite: boolean) => {
    const run = ctx.runs.shown;
    const m = ctx.store.current;
    if (!run) return;
    const options: ExportOptions = {
      kind: kind.value as ExportKind,
      roundToStep: roundStep.checked,
      decimals: decimals.value.trim() === '' ? null : Math.max(0, Math.min(10, Math.round(Number(decimals.value)))),
      delimiter: delimiter.value as Delimiter,
      formulaGuard: formulaGuard.checked,
    };
    const iv = intervalsOfRun(run, m.scale, ctx.view.state.intervalLevel);
    let text: string;
    try {
      text = buildExport(m, run.result, run.trust?.spread ?? run.result.spread, options, iv);
    } catch (err) {
      status.textContent = err instanceof Error ? err.message : String(err);
      return;
    }
    const observed = observedCount(m);
    const sidecarText = sidecar.checked
      ? buildSidecar({
          app: { name: 'Rankfill', version: appVersion },
          exportedAt: new Date(),
          file: path.value,
          options,
          document: {
            title: ctx.store.title,
            rows: m.rowLabels.length,
            cols: m.colLabels.length,
            observed,
            filled: m.values.length - observed,
          },
          settings: run.settings,
          run: {
            iterations: run.result.iterations,
            converged: run.result.converged,
            finalObjective: run.result.objectiveTrace.length
              ? run.result.objectiveTrace[run.result.objectiveTrace.length - 1]
              : null,
            refitsAfterEdits: run.refits,
          },
          metrics: run.evaluation
            ? {
                folds: run.evaluation.k,
                seed: run.evaluation.seed,
                meanRmse: run.evaluation.meanRmse,
                sdRmse: run.evaluation.sdRmse,
                meanMae: run.evaluation.meanMae,
                sdMae: run.evaluation.sdMae,
              }
            : null,
          ...(iv ? { intervals: sidecarIntervals(iv) } : {}),
          inputSha256: await sha256Hex(matrixFingerprintText(m)),
        })
      : undefined;
    write.disabled = true;
    try {
      const reply = await ctx.bridge.call('export.write', {
        path: path.value.trim(),
        text,
        overwrite,
        ...(sidecarText ? { sidecar: sidecarText } : {}),
        ...(mask.checked && options.kind !== 'long' ? { mask: buildMask(m, options.delimiter) } : {}),
      });
      if (reply.ok) {
        status.textContent = `Written: ${reply.path}${reply.sidecarPath ? ` and ${reply.sidecarPath}` : ''}${reply.maskPath ? ` and ${reply.maskPath}` : ''}.`;
        ctx.record.addExport(run.id, {
          path: reply.path,
          sidecarPath: reply.sidecarPath,
          writtenAt: new Date().toISOString(),
        });
        ctx.notice.show(`Exported to ${reply.path}. Filled values in it are model estimates.`);
      } else if (reply.reason === 'exists') {
        if (
          await confirmDialog(
            'Replace the file?',
            `${reply.message}. Replace it (and its settings file)?`,
            'Replace',
            'Keep it',
            'export-overwrite-dialog',
          )
        )
          await doWrite(true);
        else status.textContent = 'Not written: choose another file name.';
      } else status.textContent = reply.message;
    } catch (err) {
      status.textContent = err instanceof Error ? err.message : String(err);
    } finally {
      write.disabled = false;
    }
  };
  write.addEventListener('click', () => void doWrite(false));

  return {
    async open() {
      const run = ctx.runs.shown;
      if (!runFitsDocument(run, ctx.store)) {
        ctx.notice.show('Nothing to export yet: fill the blank cells first (Model tab).', 'error');
        return;
      }
      runLine.textContent = `${runTitle(run)}: estimates from the run shown in the grid.`;
      status.textContent = '';
      const safeTitle = ctx.store.title.replace(/[^\p{L}\p{N} _.-]+/gu, '_').trim() || 'ratings';
      try {
        path.value = (await ctx.bridge.call('export.suggestPath', { fileName: `${safeTitle} filled.csv` })).path;
      } catch {
        path.value = '';
      }
      dialog.showModal();
    },
  };
}
