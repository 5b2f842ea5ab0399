/**
 * Argument parsing for the `rankfill` command line: `rankfill COMMAND INPUT [options]`.
 * Options take their value as the next argument or after `=` (`--rank 3`, `--rank=3`).
 * Every mistake becomes a UsageError whose message is one line; main.ts prints it with
 * the usage line and exits 2.
 */
import { DEFAULT_FOLDS } from '../../src-shared/engine/defaults';
import type { Centering, ModelFamily } from '../../src-shared/engine/types';

export const USAGE = [
  'usage: rankfill fill IN.csv --out OUT.csv [--layout filled|estimates|long] [--decimals D] [--level P] [--sidecar] [--mask] [--force] [--raw-labels]',
  '                [model options] [--scale MIN:MAX[:STEP]] [--long] [--duplicates last|average|refuse] [--json]',
  '       rankfill evaluate IN.csv [model options] [--folds 5] [--level P] [--json]',
  '       rankfill tune IN.csv [--models lowrank,gaussian] [--ranks R,R,...] [--lambdas L,L,...]',
  '                [--centering none,row,column,both] [--shrinkages 0,0.05,0.1,0.2] [--transpose]',
  '                [--folds 5] [--seed S] [--iterations N] [--tolerance T] [--scale MIN:MAX[:STEP]] [--long] [--json]',
  '       rankfill report IN.csv|PROJECT.rankfill --out REPORT.html [model options as for fill] [--run ID] [--folds 5]',
  '                [--compare-centering] [--tune [--ranks R,R,...] [--lambdas L,L,...]] [--csv FILLED.csv] [--json]',
  '       rankfill COMMAND --help   lists every option of COMMAND with its default',
].join('\n');

export type Command = 'fill' | 'evaluate' | 'tune' | 'report';
const COMMANDS: readonly Command[] = ['fill', 'evaluate', 'tune', 'report'];

/** One command-line option: who takes it, what it holds, its default, what it does. */
interface OptionSpec {
  name: string;
  /** Placeholder of the value; absent for a flag. */
  value?: string;
  commands: readonly Command[];
  /** The default as the help prints it (per command where they differ). */
  default: string | Partial<Record<Command, string>>;
  help: string;
}

const ALL: readonly Command[] = COMMANDS;
const FIT: readonly Command[] = ['fill', 'evaluate', 'report'];

/** Every option, in the order the help lists them. Defaults are those of the engine (engine/defaults.ts, gaussian/settings.ts). */
export const OPTIONS: readonly OptionSpec[] = [
  { name: 'out', value: 'OUT.csv', commands: ['fill'], default: 'required', help: 'file to write' },
  { name: 'out', value: 'REPORT.html', commands: ['report'], default: 'required', help: 'the study report to write' },
  {
    name: 'run',
    value: 'ID',
    commands: ['report'],
    default: 'the last saved run',
    help: 'with a project as input: which saved run (id or 1-based position)',
  },
  {
    name: 'csv',
    value: 'FILLED.csv',
    commands: ['report'],
    default: 'none',
    help: 'also write the filled matrix and its settings file',
  },
  { name: 'compare-centering', commands: ['report'], default: 'off', help: 'add the centering comparison' },
  { name: 'tune', commands: ['report'], default: 'off', help: 'add the tuning grid (--ranks, --lambdas)' },
  {
    name: 'layout',
    value: 'filled|estimates|long',
    commands: ['fill'],
    default: 'filled (long with --long)',
    help: "filled: wide, observed ratings plus estimates; estimates: wide, estimates only; long: row,column,value,source,baseline,spread (same writers as the window's export)",
  },
  {
    name: 'decimals',
    value: 'D',
    commands: ['fill', 'report'],
    default: 'full precision',
    help: 'round estimates to D decimals (observed ratings are written as read)',
  },
  {
    name: 'level',
    value: 'P',
    commands: ['fill', 'evaluate', 'report'],
    default: { fill: 'none (no intervals)', evaluate: '0.8', report: 'none (no intervals section)' },
    help:
      'interval level, 0.5–0.99: fill also fits the 5 fold models and gives every filled cell an interval meant to hold the true rating ' +
      'in a share P of cells like the held-out ones (long layout: lower,upper columns; bounds inclusive, clipped to the scale); ' +
      'evaluate reports the coverage and mean width of such intervals on each fold',
  },
  {
    name: 'sidecar',
    commands: ['fill'],
    default: 'off',
    help: 'also write OUT.settings.json: settings, seed, iterations, objective, app version, time, hash of the input',
  },
  {
    name: 'mask',
    commands: ['fill'],
    default: 'off',
    help: 'with a wide layout, also write OUT.mask.csv saying "observed" or "filled" for every cell',
  },
  {
    name: 'raw-labels',
    commands: ['fill', 'report'],
    default: 'off',
    help: 'write labels exactly, even ones starting with = + - @ that a spreadsheet would run as a formula (by default those get a leading apostrophe)',
  },
  {
    name: 'force',
    commands: ['fill', 'report'],
    default: 'off',
    help: 'replace OUT (and its sidecar, mask or --csv files) when it exists; without it an existing file is left untouched and the exit status is 2',
  },
  { name: 'model', value: 'lowrank|gaussian', commands: FIT, default: 'lowrank', help: 'model family' },
  {
    name: 'rank',
    value: 'K',
    commands: FIT,
    default: {
      fill: 'chosen from the data without model options, else 2',
      evaluate: '2',
      report: 'chosen from the data without model options, else 2',
    },
    help: 'low-rank: number of hidden traits (0 = baseline alone)',
  },
  {
    name: 'lambda',
    value: 'L',
    commands: FIT,
    default: {
      fill: '1 when another model option is given, else chosen from the data',
      evaluate: '1',
      report: '1 when another model option is given, else chosen from the data',
    },
    help: 'low-rank: ridge weight on the factors',
  },
  {
    name: 'centering',
    value: 'none|row|column|both',
    commands: ALL,
    default: {
      fill: 'chosen from the data without model options, else both',
      evaluate: 'both',
      report: 'chosen from the data without model options, else both',
      tune: 'all four for rank 0, then the best of them',
    },
    help: 'low-rank baseline; for tune a comma-separated list',
  },
  {
    name: 'shrinkage',
    value: 'S',
    commands: FIT,
    default: '0.05',
    help: 'gaussian: pull the covariance toward its diagonal, 0 ≤ S < 1',
  },
  { name: 'transpose', commands: ALL, default: 'off', help: 'gaussian: the rows are the variables' },
  { name: 'iterations', value: 'N', commands: ALL, default: '100 (low-rank), 200 (gaussian)', help: 'iteration limit' },
  {
    name: 'tolerance',
    value: 'T',
    commands: ALL,
    default: '1e-6',
    help: 'stop when the objective changes by less than T of itself',
  },
  { name: 'seed', value: 'S', commands: ALL, default: '1', help: 'seed of every random choice (start, folds)' },
  {
    name: 'folds',
    value: 'K',
    commands: ['evaluate', 'tune', 'report'],
    default: String(DEFAULT_FOLDS),
    help: 'number of cross-validation folds',
  },
  {
    name: 'models',
    value: 'LIST',
    commands: ['tune'],
    default: 'lowrank, plus gaussian when the matrix allows it',
    help: 'families to compare, e.g. lowrank,gaussian',
  },
  {
    name: 'ranks',
    value: 'LIST',
    commands: ['tune', 'report'],
    default: '0 and 1, 2, 3, 5, 8, 12, 16, 20 up to what the data support',
    help: 'ranks to try',
  },
  {
    name: 'lambdas',
    value: 'LIST',
    commands: ['tune', 'report'],
    default: 'five values ×2 apart below σ₁ of the residuals, then a refinement pass',
    help: 'lambda values to try',
  },
  {
    name: 'shrinkages',
    value: 'LIST',
    commands: ['tune'],
    default: '0,0.05,0.1,0.2',
    help: 'gaussian shrinkages to try',
  },
  {
    name: 'scale',
    value: 'MIN:MAX[:STEP]',
    commands: ALL,
    default: 'observed min and max, step detected',
    help: 'the rating scale; estimates are clipped to it, and with a STEP rounded to the step',
  },
  {
    name: 'long',
    commands: ALL,
    default: 'off',
    help: 'input is row,column,value triples (fill then writes the long layout unless --layout says otherwise)',
  },
  {
    name: 'duplicates',
    value: 'last|average|refuse',
    commands: ['fill', 'evaluate', 'tune'],
    default: 'refuse',
    help: 'with --long: a (row, column) pair given more than once keeps the last value, the average, or stops the read',
  },
  { name: 'json', commands: ALL, default: 'off', help: 'print one JSON object instead of text' },
];

const SUMMARY: Record<Command, string> = {
  fill:
    'fit once and write every cell (observed values unchanged, missing ones estimated); without --model, --rank, ' +
    '--lambda, --centering, --shrinkage or --transpose the settings are chosen by a quick 3-fold cross-validation ' +
    '(rank 0 among the candidates) and the choice is printed',
  evaluate:
    'k-fold cross-validation of one setting (RMSE and MAE per fold, and the coverage and mean width of the intervals on each fold)',
  tune:
    'cross-validate a grid of ranks × lambdas × centerings and Gaussian shrinkages on the same folds; the family ' +
    'with the lowest mean RMSE wins, and its simplest setting within one standard error is the choice',
  report:
    'fit once, cross-validate beside the baselines alone, and write a self-contained HTML study report; IN may be ' +
    'a saved project, whose run --run picks',
};

/** The help of one command: what it does and every option it takes, with its default. */
export function commandHelp(command: Command): string {
  const rows = OPTIONS.filter((o) => o.commands.includes(command)).map((o) => {
    const name = `--${o.name}${o.value ? ` ${o.value}` : ''}`;
    const def = typeof o.default === 'string' ? o.default : (o.default[command] ?? '');
    return { name, text: `${o.help} (default: ${def})` };
  });
  const width = Math.max(...rows.map((r) => r.name.length)) + 2;
  return [
    `usage: rankfill ${command} IN.csv [options]`,
    '',
    `${command}: ${SUMMARY[command]}.`,
    '',
    'options:',
    ...rows.map((r) => `  ${r.name.padEnd(width)}${r.text}`),
    '  --help'.padEnd(width + 2) + 'print this help',
    '',
    'Input is wide CSV (header row = column labels, first column = row labels, blank = missing) unless --long.',
    'Filled values are model estimates, not observations. Exit status: 0 done, 1 the fit failed, 2 malformed input, usage error or an existing output without --force.',
  ].join('\n');
}

export const HELP = `${USAGE}

Completes a sparse rating matrix with a centred low-rank model (p = baseline + u·v), or with
a Gaussian model (--model gaussian): the columns are variables of one multivariate normal,
fitted by EM, and a missing cell is its conditional mean given the row's observed cells. The
Gaussian model suits tall panels (many rows, at most 300 columns); it has its own mean, so
--centering does not apply, and --shrinkage S in [0, 1) pulls its covariance toward the
diagonal; --transpose makes the rows the variables.
  fill       ${SUMMARY.fill}
  evaluate   ${SUMMARY.evaluate}
  tune       cross-validate a grid of ranks × lambdas × centerings and Gaussian shrinkages on the
             same folds; the family with the lowest mean RMSE wins, and its simplest setting
             within one standard error is the choice. By default the Gaussian model is tried
             when it accepts the matrix (at most 300 variables, 3 observed values each) and
             there are at least 2 rows per variable; --models picks the families explicitly.
             Without --ranks / --lambdas both come from the data (five λ values ×2 apart below
             the largest singular value of the residuals, ranks up to what the ratings support),
             a second pass tries λ values between the best one and its neighbours, and without
             --centering the factor settings use the centering whose baselines alone score best
  report     fit once, cross-validate beside the baselines alone, and write a self-contained HTML
             study report (the data's missing pattern, a methods paragraph, errors, cautions,
             provenance); --compare-centering and --tune add those comparisons; IN may be a
             saved project, whose run --run picks (id or position; default the last);
             --csv also writes the filled matrix and its settings file
"model options" are --model, --rank, --lambda, --centering, --shrinkage, --transpose,
--iterations, --tolerance and --seed; \`rankfill COMMAND --help\` lists each command's options
with their defaults.

Input is wide CSV (header row = column labels, first column = row labels, blank = missing);
--long reads row,column,value triples. Without --scale the scale is the observed
min and max; with --scale MIN:MAX:STEP predictions are also rounded to the step.
Exit status: 0 done, 1 the fit failed, 2 malformed input or usage error.`;

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface CliOptions {
  command: Command;
  input: string;
  out?: string;
  rank?: number;
  lambda?: number;
  centering?: Centering;
  iterations?: number;
  tolerance?: number;
  seed?: number;
  scale?: { min: number; max: number; step?: number };
  long: boolean;
  json: boolean;
  decimals?: number;
  /** Interval level in [0.5, 0.99] (fill: only when given; evaluate: default 0.8). */
  level?: number;
  folds: number;
  /** tune / report --tune: undefined = derived from the data (engine/tuningGrid.ts). */
  ranks?: number[];
  lambdas?: number[];
  /** tune: undefined = rank 0 under all four, factor settings under the best of them. */
  centerings?: Centering[];
  /** fill / evaluate: the model family (default lowrank). */
  model: ModelFamily;
  shrinkage?: number;
  /** Gaussian model: the rows are the variables. */
  transpose: boolean;
  /** tune: families to compare; undefined = both when the shape allows the Gaussian one. */
  models?: ModelFamily[];
  shrinkages: number[];
  /** report: which saved run of a project (id or 1-based position). */
  run?: string;
  /** report: also write the filled matrix here. */
  csv?: string;
  /** report: add the centering comparison / the tuning grid. */
  compareCentering: boolean;
  tune: boolean;
  /** fill: what to write (default filled, or long with --long). */
  layout: FillLayout;
  /** fill: also write OUT.settings.json. */
  sidecar: boolean;
  /** fill: also write OUT.mask.csv (wide layouts). */
  mask: boolean;
  /** fill: replace existing output files. */
  force: boolean;
  /** fill, report --csv: no formula guard on labels. */
  rawLabels: boolean;
  /** --long input: what to do with a repeated (row, column) pair. */
  duplicates: DuplicatePolicy;
  /** fill: a model option (--model, --rank, --lambda, --centering, --shrinkage, --transpose) was given. */
  modelOptionsGiven: boolean;
}

export type FillLayout = 'filled' | 'estimates' | 'long';
type DuplicatePolicy = 'last' | 'average' | 'refuse';

export type ParsedArgs =
  { kind: 'help'; command?: Command } | { kind: 'version' } | { kind: 'run'; options: CliOptions };

const CENTERINGS: readonly Centering[] = ['none', 'row', 'column', 'both'];
const MODELS: readonly ModelFamily[] = ['lowrank', 'gaussian'];
const VALUE_OPTIONS = new Set(OPTIONS.filter((o) => o.value !== undefined).map((o) => o.name));
const FLAG_OPTIONS = new Set(OPTIONS.filter((o) => o.value === undefined).map((o) => o.name));
const ALLOWED = Object.fromEntries(
  COMMANDS.map((c) => [c, new Set(OPTIONS.filter((o) => o.commands.includes(c)).map((o) => o.name))]),
) as Record<Command, Set<string>>;
const LAYOUTS: readonly FillLayout[] = ['filled', 'estimates', 'long'];
const DUPLICATES: readonly DuplicatePolicy[] = ['last', 'average', 'refuse'];

function number(name: string, text: string): number {
  const t = text.trim();
  const x = t === '' ? NaN : Number(t);
  if (!Number.isFinite(x)) throw new UsageError(`--${name} expects a number, got "${text}"`);
  return x;
}

function wholeNumber(name: string, text: string, min: number): number {
  const x = number(name, text);
  if (!Number.isInteger(x) || x < min) throw new UsageError(`--${name} expects a whole number ≥ ${min}, got "${text}"`);
  return x;
}

function nonNegative(name: string, text: string): number {
  const x = number(name, text);
  if (x < 0) throw new UsageError(`--${name} expects a number ≥ 0, got "${text}"`);
  return x;
}

function centering(name: string, text: string): Centering {
  const c = text.trim() as Centering;
  if (!CENTERINGS.includes(c)) throw new UsageError(`--${name} expects one of ${CENTERINGS.join(', ')}, got "${text}"`);
  return c;
}

function model(name: string, text: string): ModelFamily {
  const m = text.trim() as ModelFamily;
  if (!MODELS.includes(m))
    throw new UsageError(
      `--${name} expects ${name === 'models' ? 'a list of ' : 'one of '}${MODELS.join(', ')}, got "${text}"`,
    );
  return m;
}

function shrinkage(name: string, text: string): number {
  const x = number(name, text);
  if (!(x >= 0 && x < 1)) throw new UsageError(`--${name} expects a number ≥ 0 and < 1, got "${text}"`);
  return x;
}

function oneOf<T extends string>(name: string, text: string, allowed: readonly T[]): T {
  const v = text.trim() as T;
  if (!allowed.includes(v)) throw new UsageError(`--${name} expects one of ${allowed.join(', ')}, got "${text}"`);
  return v;
}

function list<T>(name: string, text: string, item: (name: string, s: string) => T): T[] {
  const parts = text.split(',');
  if (parts.some((p) => p.trim() === ''))
    throw new UsageError(`--${name} expects a comma-separated list, got "${text}"`);
  return parts.map((p) => item(name, p));
}

function scale(text: string): CliOptions['scale'] {
  const parts = text.split(':');
  if (parts.length < 2 || parts.length > 3)
    throw new UsageError(`--scale expects MIN:MAX or MIN:MAX:STEP, got "${text}"`);
  const min = number('scale', parts[0]);
  const max = number('scale', parts[1]);
  if (!(min < max)) throw new UsageError(`--scale needs MIN < MAX, got "${text}"`);
  if (parts.length === 2) return { min, max };
  const step = number('scale', parts[2]);
  if (!(step > 0)) throw new UsageError(`--scale needs STEP > 0, got "${text}"`);
  return { min, max, step };
}

export function parseArgs(argv: string[]): ParsedArgs {
  if (argv.length === 0) throw new UsageError('missing command');
  const named = (c: string | undefined): Command | undefined =>
    (COMMANDS as readonly string[]).includes(c ?? '') ? (c as Command) : undefined;
  if (argv[0] === 'help') return { kind: 'help', command: named(argv[1]) };
  if (argv.includes('--help') || argv.includes('-h')) return { kind: 'help', command: named(argv[0]) };
  if (argv[0] === '--version' || argv[0] === 'version') return { kind: 'version' };
  const command = argv[0];
  if (command !== 'fill' && command !== 'evaluate' && command !== 'tune' && command !== 'report')
    throw new UsageError(`unknown command "${command}"`);
  const positional: string[] = [];
  const values = new Map<string, string>();
  const flags = new Set<string>();
  for (let t = 1; t < argv.length; t++) {
    const arg = argv[t];
    if (!arg.startsWith('--') || arg === '--') {
      positional.push(arg);
      continue;
    }
    const eq = arg.indexOf('=');
    const name = eq >= 0 ? arg.slice(2, eq) : arg.slice(2);
    if (!VALUE_OPTIONS.has(name) && !FLAG_OPTIONS.has(name)) throw new UsageError(`unknown option --${name}`);
    if (!ALLOWED[command].has(name)) throw new UsageError(`option --${name} does not apply to "${command}"`);
    if (FLAG_OPTIONS.has(name)) {
      if (eq >= 0) throw new UsageError(`option --${name} takes no value`);
      flags.add(name);
      continue;
    }
    let value: string;
    if (eq >= 0) value = arg.slice(eq + 1);
    else {
      if (t + 1 >= argv.length) throw new UsageError(`option --${name} needs a value`);
      value = argv[++t];
    }
    if (values.has(name)) throw new UsageError(`option --${name} is given twice`);
    values.set(name, value);
  }
  if (positional.length === 0) throw new UsageError(`"${command}" needs an input file`);
  if (positional.length > 1) throw new UsageError(`unexpected argument "${positional[1]}"`);
  const get = (n: string) => values.get(n);
  const opts: CliOptions = {
    command,
    input: positional[0],
    long: flags.has('long'),
    json: flags.has('json'),
    folds: get('folds') !== undefined ? wholeNumber('folds', get('folds')!, 2) : DEFAULT_FOLDS,
    ranks: get('ranks') !== undefined ? list('ranks', get('ranks')!, (n, s) => wholeNumber(n, s, 0)) : undefined,
    lambdas: get('lambdas') !== undefined ? list('lambdas', get('lambdas')!, nonNegative) : undefined,
    model: get('model') !== undefined ? model('model', get('model')!) : 'lowrank',
    transpose: flags.has('transpose'),
    shrinkages:
      get('shrinkages') !== undefined ? list('shrinkages', get('shrinkages')!, shrinkage) : [0, 0.05, 0.1, 0.2],
    layout:
      get('layout') !== undefined ? oneOf('layout', get('layout')!, LAYOUTS) : flags.has('long') ? 'long' : 'filled',
    sidecar: flags.has('sidecar'),
    mask: flags.has('mask'),
    force: flags.has('force'),
    rawLabels: flags.has('raw-labels'),
    duplicates: get('duplicates') !== undefined ? oneOf('duplicates', get('duplicates')!, DUPLICATES) : 'refuse',
    compareCentering: flags.has('compare-centering'),
    tune: flags.has('tune'),
    modelOptionsGiven:
      ['model', 'rank', 'lambda', 'centering', 'shrinkage'].some((n) => values.has(n)) || flags.has('transpose'),
  };
  if (get('run') !== undefined) opts.run = get('run')!.trim();
  if (get('csv') !== undefined) opts.csv = get('csv');
  if (command === 'report' && (get('ranks') !== undefined || get('lambdas') !== undefined) && !opts.tune)
    throw new UsageError('--ranks and --lambdas apply to "report" with --tune only');
  if (get('duplicates') !== undefined && !opts.long)
    throw new UsageError('--duplicates applies to long input only (add --long)');
  if (opts.mask && opts.layout === 'long')
    throw new UsageError('--mask applies to the wide layouts (the long layout has a source column)');
  if (get('shrinkage') !== undefined) opts.shrinkage = shrinkage('shrinkage', get('shrinkage')!);
  if (get('models') !== undefined) opts.models = [...new Set(list('models', get('models')!, model))];
  if (command !== 'tune') {
    const family = opts.model;
    const other = family === 'gaussian' ? ['rank', 'lambda', 'centering'] : ['shrinkage', 'transpose'];
    for (const n of other) {
      if (values.has(n) || flags.has(n)) {
        throw new UsageError(
          n === 'centering'
            ? '--centering does not apply to the gaussian model (its mean is part of the model)'
            : `--${n} applies to the ${family === 'gaussian' ? 'lowrank' : 'gaussian'} model only (add --model ${family === 'gaussian' ? 'lowrank' : 'gaussian'})`,
        );
      }
    }
  }
  if (get('out') !== undefined) opts.out = get('out');
  if (get('rank') !== undefined) opts.rank = wholeNumber('rank', get('rank')!, 0);
  if (get('lambda') !== undefined) opts.lambda = nonNegative('lambda', get('lambda')!);
  if (get('iterations') !== undefined) opts.iterations = wholeNumber('iterations', get('iterations')!, 0);
  if (get('tolerance') !== undefined) opts.tolerance = nonNegative('tolerance', get('tolerance')!);
  if (get('seed') !== undefined) opts.seed = wholeNumber('seed', get('seed')!, 0);
  if (get('decimals') !== undefined) opts.decimals = wholeNumber('decimals', get('decimals')!, 0);
  if (opts.decimals !== undefined && opts.decimals > 17) throw new UsageError('--decimals expects at most 17');
  if (get('level') !== undefined) {
    const x = number('level', get('level')!);
    if (!(x >= 0.5 && x <= 0.99))
      throw new UsageError(`--level expects a share between 0.5 and 0.99 (e.g. 0.9 for 90 %), got "${get('level')}"`);
    opts.level = x;
  }
  if (get('scale') !== undefined) opts.scale = scale(get('scale')!);
  if (get('centering') !== undefined) {
    if (command === 'tune') opts.centerings = list('centering', get('centering')!, centering);
    else opts.centering = centering('centering', get('centering')!);
  }
  if (command === 'fill' && opts.out === undefined) throw new UsageError('"fill" needs --out OUT.csv');
  if (command === 'report' && opts.out === undefined) throw new UsageError('"report" needs --out REPORT.html');
  return { kind: 'run', options: opts };
}
