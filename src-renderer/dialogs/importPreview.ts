/**
 * The import preview: before anything is opened, show what the file holds
 * (size, observed count, detected delimiter, layout and scale, the first 20 rows
 * as a table under the file's own row-label title) and every problem as
 * `line:column: reason`, with options to override the detection — the scale
 * (lowest, highest, step; the guess is explained) and, for long files, the
 * column order. Changing an option parses again (on the main side, in a worker thread).
 */
import type { ApiReply, ApiRequest, DocumentPayload } from '../../src-shared/api';
import { describeScale } from '../grid/cellText';
import { listBlock, showModal } from './modal';
import { el } from '../panels/dom';

type PreviewRequest = ApiRequest<'document.previewImport'>;
type PreviewReply = ApiReply<'document.previewImport'>;

interface ImportOptions {
  delimiter: 'auto' | ',' | '\t' | ';';
  layout: 'auto' | 'wide' | 'long';
  decimalComma: 'auto' | 'yes' | 'no';
  missingTokens: string;
  duplicates: 'refuse' | 'last' | 'average';
  /** The scale as typed in the preview ('' = use the guess). */
  scaleMin: string;
  scaleMax: string;
  scaleStep: string;
  columnOrder: 'as-read' | 'sorted';
}

const DEFAULT_IMPORT_OPTIONS: ImportOptions = {
  delimiter: 'auto',
  layout: 'auto',
  decimalComma: 'auto',
  missingTokens: 'NA, N/A, -, ., ?',
  duplicates: 'refuse',
  scaleMin: '',
  scaleMax: '',
  scaleStep: '',
  columnOrder: 'as-read',
};

/** Rows of data shown in the preview table. */
const PREVIEW_ROWS = 20;

const readNumber = (t: string) => (t.trim() === '' ? NaN : Number(t.trim().replace(',', '.')));

/** The scale typed in the preview, or undefined while it is left to the guess; a reason when it cannot be used. */
function typedScale(o: ImportOptions): { scale?: { min: number; max: number; step: number }; problem?: string } {
  if (o.scaleMin.trim() === '' && o.scaleMax.trim() === '' && o.scaleStep.trim() === '') return {};
  const min = readNumber(o.scaleMin);
  const max = readNumber(o.scaleMax);
  const step = o.scaleStep.trim() === '' ? 0 : readNumber(o.scaleStep);
  if (![min, max, step].every(Number.isFinite))
    return { problem: 'the scale needs numbers for its lowest and highest rating (and step, 0 = any value)' };
  if (!(max > min)) return { problem: 'the highest rating must be above the lowest' };
  if (step < 0 || step > max - min) return { problem: 'the step must be between 0 (any value) and the whole range' };
  return { scale: { min, max, step } };
}

const delimiterNames: Record<string, string> = { ',': 'comma', '\t': 'tab', ';': 'semicolon' };

function toRequest(fileName: string, text: string, o: ImportOptions): PreviewRequest {
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
    columnOrder: o.columnOrder,
    ...(typedScale(o).scale ? { scale: typedScale(o).scale } : {}),
  };
}

function select(name: string, label: string, value: string, choices: [string, string][]): HTMLElement {
  const s = el('select', { testid: `import-${name}`, attrs: { name: name } });
  for (const [v, text] of choices) s.append(el('option', { text: text, attrs: { value: v } }));
  s.value = value;
  return el('label', { className: 'rf-dialog-field' }, [el('span', { text: label }), s]);
}

function textField(name: keyof ImportOptions, label: string, value: string, placeholder: string): HTMLElement {
  const input = el('input', {
    testid: `import-${name}`,
    attrs: { type: 'text', inputmode: 'decimal', name, placeholder },
  });
  input.value = value;
  return el('label', { className: 'rf-dialog-field' }, [el('span', { text: label }), input]);
}

/** Why the scale is what it is: the observed range and the largest step that divides every value. */
function scaleGuessText(reply: PreviewReply): string {
  if (!reply.ok) return 'Set the scale here if the file’s values are on a known scale.';
  const g = reply.info.detectedScale;
  const step =
    g.step > 0 ? `every value is a multiple of ${g.step}` : 'the values share no common step (any value is allowed)';
  if (reply.info.scaleSource === 'given')
    return `Using the scale set here. The values alone would suggest ${describeScale(g)} (lowest ${g.min}, highest ${g.max}; ${step}).`;
  return (
    `Guessed from the values: the lowest is ${g.min}, the highest ${g.max}, and ${step}, so ${describeScale(reply.document.matrix.scale)}. ` +
    'A questionnaire scored 0–10 where nobody answered 0 or 1 would be guessed too narrow: set the real scale here; a value outside it or between its steps is then listed as a problem.'
  );
}

function optionsForm(o: ImportOptions, reply: PreviewReply): HTMLElement {
  const tokens = el('input', { testid: 'import-missingTokens', attrs: { type: 'text', name: 'missingTokens' } });
  tokens.value = o.missingTokens;
  const guess = reply.ok ? reply.document.matrix.scale : undefined;
  return el('fieldset', { className: 'rf-import-options' }, [
    el('legend', { text: 'Reading options' }),
    select('delimiter', 'Delimiter', o.delimiter, [
      ['auto', 'detect'],
      [',', 'comma'],
      ['\t', 'tab'],
      [';', 'semicolon'],
    ]),
    select('layout', 'Layout', o.layout, [
      ['auto', 'detect'],
      ['wide', 'wide (a row per label, a column per item)'],
      ['long', 'long (row, column, value)'],
    ]),
    select('decimalComma', 'Decimal comma', o.decimalComma, [
      ['auto', 'detect'],
      ['yes', 'yes (3,5 means 3.5)'],
      ['no', 'no'],
    ]),
    el('label', { className: 'rf-dialog-field' }, [
      el('span', { text: 'Missing-value words (empty is always missing)' }),
      tokens,
    ]),
    select('duplicates', 'Repeated (row, column) pairs, long layout', o.duplicates, [
      ['refuse', 'refuse the file'],
      ['last', 'keep the last value'],
      ['average', 'average the values'],
    ]),
    select('columnOrder', 'Column order, long layout', o.columnOrder, [
      ['as-read', 'as read (first appearance)'],
      ['sorted', 'sorted by label (item 2 before item 10)'],
    ]),
    el('div', { className: 'rf-import-scale' }, [
      textField('scaleMin', 'Lowest rating', o.scaleMin, guess ? String(guess.min) : ''),
      textField('scaleMax', 'Highest rating', o.scaleMax, guess ? String(guess.max) : ''),
      textField('scaleStep', 'Step (0 = any value)', o.scaleStep, guess ? String(guess.step) : ''),
    ]),
    el('p', { className: 'rf-hint', testid: 'import-scale-note', text: scaleGuessText(reply) }),
  ]);
}

function readForm(form: HTMLElement): ImportOptions {
  const v = (n: string) => (form.querySelector(`[name="${n}"]`) as HTMLInputElement | HTMLSelectElement).value;
  return {
    delimiter: v('delimiter') as ImportOptions['delimiter'],
    layout: v('layout') as ImportOptions['layout'],
    decimalComma: v('decimalComma') as ImportOptions['decimalComma'],
    missingTokens: v('missingTokens'),
    duplicates: v('duplicates') as ImportOptions['duplicates'],
    scaleMin: v('scaleMin'),
    scaleMax: v('scaleMax'),
    scaleStep: v('scaleStep'),
    columnOrder: v('columnOrder') as ImportOptions['columnOrder'],
  };
}

function summary(reply: PreviewReply, fileName: string, bytes: number): HTMLElement {
  if (!reply.ok) {
    return el('div', { testid: 'import-summary' }, [
      el('p', {
        className: 'rf-dialog-bad',
        text: `${fileName} cannot be opened as it is: ${reply.problems.length} problem${reply.problems.length === 1 ? '' : 's'}.`,
      }),
      listBlock(
        reply.problems.map((p) => `${p.line}:${p.column}: ${p.message}`),
        'import-problems',
      ),
    ]);
  }
  const i = reply.info;
  const cells = i.rows * i.cols;
  const facts: [string, string][] = [
    [
      'Size',
      `${i.rows} rows × ${i.cols} columns (${cells.toLocaleString('en')} cells; file ${bytes < 1024 ? `${bytes} bytes` : bytes < 1048576 ? `${(bytes / 1024).toFixed(1)} KB` : `${(bytes / 1048576).toFixed(1)} MB`})`,
    ],
    [
      'Observed',
      `${i.observed.toLocaleString('en')} values (${cells ? ((100 * (cells - i.observed)) / cells).toFixed(1) : '0'} % blank)`,
    ],
    [
      'Delimiter',
      `${delimiterNames[i.delimiter]}${i.decimalComma ? ', decimal comma' : ''}${i.hadBom ? ', byte-order mark skipped' : ''}`,
    ],
    [
      'Layout',
      i.layout === 'wide' ? 'wide' : `long (pivoted${i.duplicatePairs ? `, ${i.duplicatePairs} repeated pairs` : ''})`,
    ],
    [i.scaleSource === 'given' ? 'Scale (set here)' : 'Scale (guessed)', describeScale(reply.document.matrix.scale)],
  ];
  const dl = el('dl', { className: 'rf-facts', testid: 'import-summary' });
  for (const [k, v] of facts) dl.append(el('dt', { text: k }), el('dd', { text: v }));
  const box = el('div', {}, [dl, previewTable(reply.document)]);
  if (reply.document.warnings.length) {
    box.append(
      el('p', { text: `${reply.document.warnings.length} note${reply.document.warnings.length === 1 ? '' : 's'}:` }),
      listBlock(
        reply.document.warnings.map((p) => `${p.line}:${p.column}: ${p.message}`),
        'import-warnings',
      ),
    );
  }
  return box;
}

/** The first rows of what would be opened, under the file's own row-label title. */
function previewTable(doc: DocumentPayload): HTMLElement {
  const m = doc.matrix;
  const cols = m.colLabels.length;
  const shownCols = Math.min(cols, 30);
  const head = el('tr', {}, [
    el('th', { text: m.rowHeader ?? '' }),
    ...m.colLabels.slice(0, shownCols).map((c) => el('th', { text: c })),
  ]);
  const body = m.rowLabels.slice(0, PREVIEW_ROWS).map((label, i) =>
    el('tr', {}, [
      el('th', { text: label }),
      ...Array.from({ length: shownCols }, (_, j) => {
        const v = m.values[i * cols + j];
        return el('td', { text: v === null ? '' : String(v) });
      }),
    ]),
  );
  const more = [
    m.rowLabels.length > PREVIEW_ROWS ? `${m.rowLabels.length - PREVIEW_ROWS} more rows` : '',
    cols > shownCols ? `${cols - shownCols} more columns` : '',
  ].filter(Boolean);
  return el('div', { className: 'rf-import-table-wrap' }, [
    el('p', {
      className: 'rf-hint',
      text: `First ${Math.min(PREVIEW_ROWS, m.rowLabels.length)} rows as they would open${more.length ? ` (${more.join(', ')} not shown)` : ''}:`,
    }),
    el('table', { className: 'rf-table rf-import-table', testid: 'import-table' }, [
      el('thead', {}, [head]),
      el('tbody', {}, body),
    ]),
  ]);
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
    const form = optionsForm(options, reply);
    const scaleProblem = typedScale(options).problem;
    const body = el('div', { className: 'rf-import' }, [
      ...(scaleProblem
        ? [
            el('p', {
              className: 'rf-dialog-bad',
              testid: 'import-scale-problem',
              text: `The scale set below is not used: ${scaleProblem}.`,
            }),
          ]
        : []),
      summary(reply, fileName, bytes),
      form,
    ]);
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
