/**
 * Reading and writing Rankfill project files (format described in projectSchema.ts).
 *
 * parseProject never throws and never returns a partial project: the text must
 * be valid JSON, carry our format tag, have a version this build reads, and pass
 * the whole schema; otherwise the answer is a list of problems. For project files
 * a problem's `column` is the character column in the JSON text (1-based).
 */
import type { Problem } from '../io/problem';
import { ProblemCollector } from '../io/problem';
import type { FitSettings } from '../engine/types';
import type { ProjectDocument, SavedRun } from './projectDocument';
import { locateJsonPath, positionOfOffset } from './locateJsonPath';
import { findJsonSyntaxError, peekMatrixShape } from './jsonSyntax';
import { MAX_CELLS } from '../io/importCommon';
import { migrateProject } from './projectMigration';
import { PROJECT_FORMAT_TAG, PROJECT_FORMAT_VERSION, projectFileSchema, type ProjectFile } from './projectSchema';

export type ParseProjectResult = { ok: true; project: ProjectDocument } | { ok: false; problems: Problem[] };

function num(x: number): number | null {
  return Number.isFinite(x) ? (x === 0 ? 0 : x) : null;
}

function toGrid(values: ArrayLike<number>, rows: number, cols: number): (number | null)[][] {
  const out: (number | null)[][] = new Array(rows);
  for (let i = 0; i < rows; i++) {
    const row: (number | null)[] = new Array(cols);
    for (let j = 0; j < cols; j++) row[j] = num(values[i * cols + j]);
    out[i] = row;
  }
  return out;
}

function fromGrid(grid: (number | null)[][], rows: number, cols: number): Float64Array {
  const v = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) {
    const row = grid[i];
    for (let j = 0; j < cols; j++) {
      const x = row[j];
      v[i * cols + j] = x === null ? NaN : x;
    }
  }
  return v;
}

/** The file object for a document (plain JSON data). */
function projectToFile(doc: ProjectDocument): ProjectFile {
  const m = doc.matrix;
  const rows = m.rowLabels.length;
  const cols = m.colLabels.length;
  return {
    format: PROJECT_FORMAT_TAG,
    version: PROJECT_FORMAT_VERSION,
    createdAt: doc.createdAt,
    modifiedAt: doc.modifiedAt,
    matrix: {
      rowLabels: m.rowLabels.slice(),
      colLabels: m.colLabels.slice(),
      values: toGrid(m.values, rows, cols),
      scale: { ...m.scale },
      ...(m.rowHeader !== undefined ? { rowHeader: m.rowHeader } : {}),
    },
    settings: doc.settings ? { ...doc.settings } : null,
    runs: doc.runs.map((r) => ({
      id: r.id,
      number: r.number,
      name: r.name,
      fittedAt: r.fittedAt,
      savedAt: r.savedAt,
      settings: { ...r.settings },
      metrics: Object.fromEntries(Object.entries(r.metrics).map(([k, v]) => [k, v === null ? null : num(v)])),
      ...(r.predictions ? { predictions: toGrid(r.predictions, rows, cols) } : {}),
    })),
    notes: doc.notes,
  };
}

function gridText(grid: (number | null)[][], indent: string): string {
  if (grid.length === 0) return '[]';
  return '[\n' + grid.map((row) => indent + '  ' + JSON.stringify(row)).join(',\n') + '\n' + indent + ']';
}

/**
 * The file text: JSON with one key per line and one matrix row per line,
 * so files stay readable and diff well. Ends with a newline.
 */
export function serializeProject(doc: ProjectDocument): string {
  const f = projectToFile(doc);
  const m = f.matrix;
  const runs = f.runs.map((r) => {
    const { predictions, ...rest } = r;
    const head = JSON.stringify(rest);
    if (!predictions) return '    ' + head;
    return '    ' + head.slice(0, -1) + ',"predictions":' + gridText(predictions, '    ') + '}';
  });
  const lines = [
    '{',
    `  "format": ${JSON.stringify(f.format)},`,
    `  "version": ${f.version},`,
    `  "createdAt": ${JSON.stringify(f.createdAt)},`,
    `  "modifiedAt": ${JSON.stringify(f.modifiedAt)},`,
    '  "matrix": {',
    `    "rowLabels": ${JSON.stringify(m.rowLabels)},`,
    `    "colLabels": ${JSON.stringify(m.colLabels)},`,
    `    "scale": ${JSON.stringify(m.scale)},`,
    ...(m.rowHeader !== undefined ? [`    "rowHeader": ${JSON.stringify(m.rowHeader)},`] : []),
    `    "values": ${gridText(m.values, '    ')}`,
    '  },',
    `  "settings": ${JSON.stringify(f.settings)},`,
    `  "runs": ${runs.length === 0 ? '[]' : '[\n' + runs.join(',\n') + '\n  ]'},`,
    `  "notes": ${JSON.stringify(f.notes)}`,
    '}',
  ];
  return lines.join('\n') + '\n';
}

/**
 * Problem for text JSON.parse refused: located exactly by our own scanner (jsonSyntax.ts),
 * quoting at most the offending token; V8's own message only when the scanner disagrees.
 */
function jsonProblem(text: string, err: unknown, problems: ProblemCollector): void {
  const found = findJsonSyntaxError(text);
  if (found) {
    const pos = positionOfOffset(text, found.offset);
    problems.add(
      pos.line,
      pos.column,
      found.endsEarly
        ? `the project file ends too early (${found.reason}); it may be truncated or damaged`
        : `the project file is not valid JSON (${found.reason}); it may be damaged`,
    );
    return;
  }
  const raw = err instanceof Error ? err.message : String(err);
  const at = /at position (\d+)/.exec(raw);
  const lc = /\(line (\d+) column (\d+)\)/.exec(raw);
  const offset = at ? Number(at[1]) : -1;
  // V8 reports a cut-off file either as "end of JSON input" or as an error at the very end.
  const endsEarly = /end of (JSON|data)|Unterminated/i.test(raw) || offset >= text.trimEnd().length;
  const pos = lc
    ? { line: Number(lc[1]), column: Number(lc[2]) }
    : offset >= 0
      ? positionOfOffset(text, offset)
      : endsEarly
        ? positionOfOffset(text, text.length)
        : { line: 1, column: 1 };
  const reason = raw
    .replace(/^JSON\.parse: /, '')
    .replace(/\s*in JSON at position \d+.*$/, '')
    .replace(/\s*\(line \d+ column \d+\)/, '')
    .replace(/, "[\s\S]*$/, '')
    .trim();
  problems.add(
    pos.line,
    pos.column,
    endsEarly
      ? `the project file ends too early (${reason}); it may be truncated or damaged`
      : `the project file is not valid JSON (${reason}); it may be damaged`,
  );
}

function pathText(path: readonly PropertyKey[]): string {
  let s = '';
  for (const k of path) s += typeof k === 'number' ? `[${k}]` : s === '' ? String(k) : `.${String(k)}`;
  return s || '(top level)';
}

/**
 * Keys present in the file but not in the validated object (the schema drops what it does
 * not know): refused, so a misspelt or foreign key is never silently lost. `__proto__`,
 * which JSON.parse keeps as an ordinary key, is caught the same way.
 */
function unknownKeys(
  input: unknown,
  output: unknown,
  path: (string | number)[] = [],
  found: (string | number)[][] = [],
): (string | number)[][] {
  if (
    found.length >= 20 ||
    input === null ||
    typeof input !== 'object' ||
    output === null ||
    typeof output !== 'object'
  )
    return found;
  if (Array.isArray(input)) {
    if (!Array.isArray(output)) return found;
    for (let k = 0; k < input.length && found.length < 20; k++) {
      const v = input[k];
      if (v !== null && typeof v === 'object') unknownKeys(v, output[k], [...path, k], found);
    }
    return found;
  }
  for (const key of Object.keys(input)) {
    if (!Object.prototype.hasOwnProperty.call(output, key)) found.push([...path, key]);
    else
      unknownKeys(
        (input as Record<string, unknown>)[key],
        (output as Record<string, unknown>)[key],
        [...path, key],
        found,
      );
    if (found.length >= 20) break;
  }
  return found;
}

export function parseProject(input: string, fileName: string): ParseProjectResult {
  const problems = new ProblemCollector(fileName, 50);
  try {
    if (typeof input !== 'string' || input.replace(/^\uFEFF/, '').trim() === '') {
      problems.add(1, 1, 'the project file is empty');
      return { ok: false, problems: problems.list() };
    }
    const text = input.charCodeAt(0) === 0xfeff ? ' ' + input.slice(1) : input; // keep offsets
    // The cell limit is checked from the label lists alone, before the body is parsed.
    const shape = peekMatrixShape(text);
    if (shape && shape.rows * shape.cols > MAX_CELLS) {
      const p = locateJsonPath(text, ['matrix', 'rowLabels']);
      problems.add(
        p.line,
        p.column,
        `matrix: ${shape.rows} rows × ${shape.cols} columns = ${shape.rows * shape.cols} cells; the limit is ${MAX_CELLS} cells`,
      );
      return { ok: false, problems: problems.list() };
    }
    let data: unknown;
    try {
      data = JSON.parse(text);
    } catch (err) {
      jsonProblem(text, err, problems);
      return { ok: false, problems: problems.list() };
    }
    if (typeof data !== 'object' || data === null || Array.isArray(data)) {
      problems.add(1, 1, 'not a Rankfill project file (expected a JSON object)');
      return { ok: false, problems: problems.list() };
    }
    const rec = data as Record<string, unknown>;
    if (rec.format !== PROJECT_FORMAT_TAG) {
      const p = locateJsonPath(text, rec.format === undefined ? [] : ['format']);
      problems.add(
        p.line,
        p.column,
        `not a Rankfill project file (format tag ${rec.format === undefined ? 'missing' : JSON.stringify(rec.format)}; expected "${PROJECT_FORMAT_TAG}")`,
      );
      return { ok: false, problems: problems.list() };
    }
    const v = rec.version;
    const vp = locateJsonPath(text, ['version']);
    if (typeof v === 'number' && Number.isInteger(v) && v > PROJECT_FORMAT_VERSION) {
      problems.add(
        vp.line,
        vp.column,
        `made by a newer Rankfill (format v${v}); this version reads up to v${PROJECT_FORMAT_VERSION}`,
      );
      return { ok: false, problems: problems.list() };
    }
    if (typeof v !== 'number' || !Number.isInteger(v) || v < 1) {
      problems.add(
        vp.line,
        vp.column,
        `unknown project format version ${JSON.stringify(v)}; expected a whole number from 1 to ${PROJECT_FORMAT_VERSION}`,
      );
      return { ok: false, problems: problems.list() };
    }
    // Older versions are brought up to the current one first (projectMigration.ts).
    const parsed = projectFileSchema.safeParse(migrateProject(rec));
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const p = locateJsonPath(text, issue.path);
        problems.add(p.line, p.column, `${pathText(issue.path)}: ${issue.message}`);
      }
      return { ok: false, problems: problems.list() };
    }
    const unknown = unknownKeys(data, parsed.data);
    if (unknown.length > 0) {
      for (const path of unknown) {
        const p = locateJsonPath(text, path);
        problems.add(
          p.line,
          p.column,
          `${pathText(path)}: unknown key ${JSON.stringify(String(path[path.length - 1]))} (not part of the project format)`,
        );
      }
      return { ok: false, problems: problems.list() };
    }
    return { ok: true, project: fileToProject(parsed.data) };
  } catch (err) {
    problems.add(1, 1, `could not read the project file (${err instanceof Error ? err.message : String(err)})`);
    return { ok: false, problems: problems.list() };
  }
}

/** The document for a validated file object. */
function fileToProject(f: ProjectFile): ProjectDocument {
  const rows = f.matrix.rowLabels.length;
  const cols = f.matrix.colLabels.length;
  const runs: SavedRun[] = f.runs.map((r) => ({
    id: r.id,
    number: r.number,
    name: r.name,
    fittedAt: r.fittedAt,
    savedAt: r.savedAt,
    settings: r.settings as FitSettings,
    metrics: { ...r.metrics },
    ...(r.predictions ? { predictions: fromGrid(r.predictions, rows, cols) } : {}),
  }));
  return {
    matrix: {
      rowLabels: f.matrix.rowLabels.slice(),
      colLabels: f.matrix.colLabels.slice(),
      values: fromGrid(f.matrix.values, rows, cols),
      scale: { ...f.matrix.scale },
      ...(f.matrix.rowHeader !== undefined ? { rowHeader: f.matrix.rowHeader } : {}),
    },
    settings: (f.settings as FitSettings | null) ?? null,
    runs,
    notes: f.notes,
    createdAt: f.createdAt,
    modifiedAt: f.modifiedAt,
  };
}
