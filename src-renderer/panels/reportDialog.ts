/**
 * "Report…": writes the study report of the run shown in the grid — one self-contained
 * HTML file a supervisor can open or print. The page gathers the input (cross-validating
 * the run beside the baselines alone when that has not been done yet), the shared builder
 * makes the HTML, and the main side writes it atomically through the export path, asking
 * before it replaces a file.
 */
import { buildReport } from '../../src-shared/report/buildReport';
import { confirmDialog } from '../dialogs/modal';
import { gatherReport } from '../report/gatherReport';
import type { StudyRecord } from '../report/studyRecord';
import { el } from './dom';
import type { PanelContext } from './panelContext';

export function createReportDialog(
  ctx: PanelContext,
  record: StudyRecord,
  appVersion: string,
): { open(): Promise<void> } {
  const dialog = el('dialog', { className: 'rf-dialog', testid: 'report-dialog' });
  document.body.append(dialog);
  const runLine = el('p', { className: 'rf-hint', testid: 'report-run' });
  const contents = el('p', { className: 'rf-hint', testid: 'report-contents' });
  const path = el('input', { testid: 'report-path' });
  path.type = 'text';
  path.spellcheck = false;
  const status = el('p', { className: 'rf-hint', testid: 'report-status' });
  const write = el('button', { className: 'rf-button rf-primary', testid: 'report-write' }, ['Write report']);
  const close = el('button', { className: 'rf-button', testid: 'report-close' }, ['Close']);
  dialog.append(
    el('h2', {}, ['Study report of this run']),
    runLine,
    el('p', {}, [
      'One HTML file that opens in any browser and prints to A4 or Letter: the data and where its blanks are, a methods paragraph ready to paste, how well the model fills compared with the baselines alone, the cautions, and where it all came from.',
    ]),
    contents,
    el('label', { className: 'rf-form-field rf-wide' }, [el('span', { className: 'rf-form-label' }, ['File']), path]),
    status,
    el('div', { className: 'rf-row' }, [write, close]),
  );
  close.addEventListener('click', () => dialog.close());

  const doWrite = async (overwrite: boolean, html?: string): Promise<void> => {
    const run = ctx.runs.shown;
    if (!run) return;
    write.disabled = true;
    try {
      let text = html;
      if (text === undefined) {
        status.textContent = 'Preparing the report…';
        const input = await gatherReport(ctx, record, run, {
          appVersion,
          reportPath: path.value.trim(),
          onStep: (done, total) =>
            (status.textContent = `Cross-validating this run and the baselines alone: ${done} of ${total} fold fits done…`),
        });
        text = buildReport(input);
      }
      const reply = await ctx.bridge.call('export.write', { path: path.value.trim(), text, overwrite });
      if (reply.ok) {
        status.textContent = `Written: ${reply.path} (${Math.ceil(reply.bytes / 1024)} KB).`;
        ctx.notice.show(`Study report written to ${reply.path}.`);
      } else if (reply.reason === 'exists') {
        if (
          await confirmDialog(
            'Replace the file?',
            `${reply.message}. Replace it?`,
            'Replace',
            'Keep it',
            'report-overwrite-dialog',
          )
        )
          await doWrite(true, text);
        else status.textContent = 'Not written: choose another file name.';
      } else status.textContent = reply.message;
    } catch (err) {
      status.textContent = `Not written: ${err instanceof Error ? err.message : String(err)}`;
    } finally {
      write.disabled = false;
    }
  };
  write.addEventListener('click', () => void doWrite(false));

  return {
    async open() {
      const run = ctx.runs.shown;
      if (!run || run.rows !== ctx.store.current.rowLabels.length || run.cols !== ctx.store.current.colLabels.length) {
        ctx.notice.show('Nothing to report yet: fill the blank cells first (Model tab).', 'error');
        return;
      }
      runLine.textContent = `Run ${run.id}: the run shown in the grid.`;
      const parts = ['the cross-validated errors beside the baselines alone'];
      const note: string[] = [];
      for (const [kind, words] of [
        ['centering', 'the centering comparison'],
        ['tuning', 'the tuning chart'],
      ] as const) {
        if (record.grid(kind)) parts.push(words);
        else if (record.gridIsStale(kind))
          note.push(`${words} was run before the latest edits and is left out (run it again to include it)`);
      }
      const exports = record.exportsOf(run.id).length;
      contents.textContent =
        `Includes ${parts.join(', ')}${exports ? `, and the ${exports} export${exports === 1 ? '' : 's'} written from this run` : ''}.` +
        (note.length ? ` Note: ${note.join('; ')}.` : '');
      status.textContent = '';
      const safeTitle = ctx.store.title.replace(/[^\p{L}\p{N} _.-]+/gu, '_').trim() || 'ratings';
      try {
        path.value = (await ctx.bridge.call('export.suggestPath', { fileName: `${safeTitle} report.html` })).path;
      } catch {
        path.value = '';
      }
      dialog.showModal();
    },
  };
}
