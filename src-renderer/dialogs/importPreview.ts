/**
 * The import preview: before anything is opened, show what the file holds
 * (size, observed count, detected delimiter, layout and scale) and every
 * problem as `line:column: reason`, with options to override the detection.
 * Changing an option parses again (on the main side, in a worker thread).
 */
import type { ApiReply, ApiRequest, DocumentPayload } from '../../src-shared/api';
import { describeScale } from '../grid/cellText';
import { listBlock, showModal } from './modal';
import { el } from '../panels/dom';

type PreviewRequest = ApiRequest<'document.previewImport'>;
type PreviewReply = ApiReply<'document.previewImport'>;

export interface ImportOptions {
  delimiter: 'auto' | ',' | '\t' | ';';
  layout: 'auto' | 'wide' | 'long';
  decimalComma: 'auto' | 'yes' | 'no';
  missingTokens: string;
  duplicates: 'refuse' | 'last' | 'average';
}

export const DEFAULT_IMPORT_OPTIONS: ImportOptions = {
  delimiter: 'auto',
  layout: 'auto',
  decimalComma: 'auto',
  missingTokens: 'NA, N/A, -, ., ?',
  duplicates: 'refuse',
};

const delimiterNames: Record<string, string> = { ',': 'comma', '\t': 'tab', ';': 'semicolon' };

export function toRequest(fileName: string, text: string, o: ImportOptions): PreviewRequest {
  return {
    fileName,
    text,
    delimiter: o.delimiter,
    layout: o.layout,
    decimalComma: o.decimalComma === 'auto' ? 'auto' : o.decimalComma === 'yes',
    missingTokens: o.missingTokens
      .split(',')
      .map((t) => t.trim())
      .filter((t) => t !== ''),
    duplicates: o.duplicates,
  };
}

function select(name: string, label: string, value: string, choices: [string, string][]): HTMLElement {
  const s = el('select', { testid: `import-${name}`, attrs: { name: name } });
  for (const [v, text] of choices) s.append(el('option', { text: text, attrs: { value: v } }));
  s.value = value;
  return el('label', { className: 'rf-dialog-field' }, [el('span', { text: label }), s]);
}

function optionsForm(o: ImportOptions): HTMLElement {
  const tokens = el('input', { testid: 'import-missingTokens', attrs: { type: 'text', name: 'missingTokens' } });
  tokens.value = o.missingTokens;
  return el('fieldset', { className: 'rf-import-options' }, [el('legend', { text: 'Reading options' }), select('delimiter', 'Delimiter', o.delimiter, [
      ['auto', 'detect'],
      [',', 'comma'],
      ['\t', 'tab'],
      [';', 'semicolon'],
    ]), select('layout', 'Layout', o.layout, [
      ['auto', 'detect'],
      ['wide', 'wide (a row per label, a column per item)'],
      ['long', 'long (row, column, value)'],
    ]), select('decimalComma', 'Decimal comma', o.decimalComma, [
      ['auto', 'detect'],
      ['yes', 'yes (3,5 means 3.5)'],
      ['no', 'no'],
    ]), el('label', { className: 'rf-dialog-field' }, [el('span', { text: 'Missing-value words (empty is always missing)' }), tokens]), select('duplicates', 'Repeated (row, column) pairs, long layout', o.duplicates, [
      ['refuse', 'refuse the file'],
      ['last', 'keep the last value'],
      ['average', 'average the values'],
    ])]);
}

function readForm(form: HTMLElement): ImportOptions {
  const v = (n: string) => (form.querySelector(`[name="${n}"]`) as HTMLInputElement | HTMLSelectElement).value;
  return {
    delimiter: v('delimiter') as ImportOptions['delimiter'],
    layout: v('layout') as ImportOptions['layout'],
    decimalComma: v('decimalComma') as ImportOptions['decimalComma'],
    missingTokens: v('missingTokens'),
    duplicates: v('duplicates') as ImportOptions['duplicates'],
  };
}

function summary(reply: PreviewReply, fileName: string, bytes: number): HTMLElement {
  if (!reply.ok) {
    return el('div', { testid: 'import-summary' }, [el('p', { className: 'rf-dialog-bad', text: `${fileName} cannot be opened as it is: ${reply.problems.length} problem${reply.problems.length === 1 ? '' : 's'}.` }), listBlock(reply.problems.map((p) => `${p.line}:${p.column}: ${p.message}`), 'import-problems')]);
  }
  const i = reply.info;
  const cells = i.rows * i.cols;
  const facts: [string, string][] = [
    ['Size', `${i.rows} rows × ${i.cols} columns (${cells.toLocaleString('en')} cells; file ${bytes < 1024 ? `${bytes} bytes` : bytes < 1048576 ? `${(bytes / 1024).toFixed(1)} KB` : `${(bytes / 1048576).toFixed(1)} MB`})`],
    ['Observed', `${i.observed.toLocaleString('en')} values (${cells ? ((100 * (cells - i.observed)) / cells).toFixed(1) : '0'} % blank)`],
    ['Delimiter', `${delimiterNames[i.delimiter]}${i.decimalComma ? ', decimal comma' : ''}${i.hadBom ? ', byte-order mark skipped' : ''}`],
    ['Layout', i.layout === 'wide' ? 'wide' : `long (pivoted${i.duplicatePairs ? `, ${i.duplicatePairs} repeated pairs` : ''})`],
    ['Detected scale', describeScale(reply.document.matrix.scale)],
  ];
  const dl = el('dl', { className: 'rf-facts', testid: 'import-summary' });
  for (const [k, v] of facts) dl.append(el('dt', { text: k }), el('dd', { text: v }));
  const box = el('div', {}, [dl]);
  if (reply.document.warnings.length) {
    box.append(
      el('p', { text: `${reply.document.warnings.length} note${reply.document.warnings.length === 1 ? '' : 's'}:` }),
      listBlock(reply.document.warnings.map((p) => `${p.line}:${p.column}: ${p.message}`), 'import-warnings'),
    );
  }
  return box;
}

/**
 * Show the preview for a picked file; resolves with the document to open, or
 * null when the user cancels. `preview` calls `document.previewImport`.
 */
export async function importPreviewDialog(
  fileName: string,
  text: string,
  bytes: number,
  preview: (req: PreviewRequest) => Promise<PreviewReply>,
): Promise<DocumentPayload | null> {
  let options = { ...DEFAULT_IMPORT_OPTIONS };
  for (;;) {
    const reply = await preview(toRequest(fileName, text, options));
    const form = optionsForm(options);
    const body = el('div', { className: 'rf-import' }, [summary(reply, fileName, bytes), form]);
    const choice = await showModal<'cancel' | 'recheck' | 'open'>({
      title: `Bring in ${fileName}`,
      body,
      wide: true,
      testId: 'import-dialog',
      cancelValue: 'cancel',
      buttons: [
        { label: 'Cancel', value: 'cancel', testId: 'dialog-cancel' },
        { label: 'Read again with these options', value: 'recheck', testId: 'import-recheck' },
        ...(reply.ok ? [{ label: 'Open', value: 'open' as const, primary: true, testId: 'import-open' }] : []),
      ],
    });
    if (choice === 'cancel') return null;
    if (choice === 'open' && reply.ok) return reply.document;
    options = readForm(form);
  }
}
