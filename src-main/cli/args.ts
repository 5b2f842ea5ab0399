/**
 * Argument parsing for the `rankfill` command line: `rankfill COMMAND INPUT [options]`.
 * Options take their value as the next argument or after `=` (`--rank 3`, `--rank=3`).
 * Every mistake becomes a UsageError whose message is one line; main.ts prints it with
 * the usage line and exits 2.
 */
import type { Centering, ModelFamily } from '../../src-shared/engine/types';

export const USAGE = [
  'usage: rankfill fill IN.csv --out OUT.csv [--model lowrank|gaussian] [--rank K] [--lambda L]',
  '                [--centering none|row|column|both] [--shrinkage S] [--transpose]',
  '                [--iterations N] [--tolerance T] [--seed S] [--scale MIN:MAX[:STEP]] [--long] [--decimals D] [--json]',
  '       rankfill evaluate IN.csv [model options] [--folds 5] [--json]',
  '       rankfill tune IN.csv [--models lowrank,gaussian] [--ranks 0,1,2,3,5,8] [--lambdas 0.1,1,10,30]',
  '                [--centering none,row,column,both] [--shrinkages 0,0.05,0.1,0.2] [--transpose]',
  '                [--folds 5] [--seed S] [--iterations N] [--tolerance T] [--scale MIN:MAX[:STEP]] [--long] [--json]',
  '       rankfill report IN.csv|PROJECT.rankfill --out REPORT.html [model options as for fill] [--run ID] [--folds 5]',
  '                [--compare-centering] [--tune [--ranks 0,1,2,3,5,8] [--lambdas 0.1,1,10,30]] [--csv FILLED.csv] [--json]',
].join('\n');

export const HELP = `${USAGE}

Completes a sparse rating matrix with a centred low-rank model (p = baseline + u·v), or with
a Gaussian model (--model gaussian): the columns are variables of one multivariate normal,
fitted by EM, and a missing cell is its conditional mean given the row's observed cells. The
Gaussian model suits tall panels (many rows, at most 300 columns); it has its own mean, so
--centering does not apply, and --shrinkage S in [0, 1) pulls its covariance toward the
diagonal; --transpose makes the rows the variables.
  fill       fit once and write every cell (observed values unchanged, missing ones predicted)
  evaluate   k-fold cross-validation of one setting (RMSE and MAE per fold)
  tune       cross-validate a grid of ranks × lambdas × centerings and Gaussian shrinkages on the
             same folds; the family with the lowest mean RMSE wins, and its simplest setting
             within one standard error is the choice. By default the Gaussian model is tried
             when it accepts the matrix (at most 300 variables, 3 observed values each) and
             there are at least 2 rows per variable; --models picks the families explicitly
  report     fit once, cross-validate beside the baselines alone, and write a self-contained HTML
             study report (the data's missing pattern, a methods paragraph, errors, cautions,
             provenance); --compare-centering and --tune add those comparisons; IN may be a
             saved project, whose run --run picks (id or position; default the last);
             --csv also writes the filled matrix and its settings file

Input is wide CSV (header row = column labels, first column = row labels, blank = missing);
--long reads and writes row,column,value triples. Without --scale the scale is the observed
min and max; with --scale MIN:MAX:STEP predictions are also rounded to the step.
Exit status: 0 done, 1 the fit failed, 2 malformed input or usage error.`;

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export type Command = 'fill' | 'evaluate' | 'tune' | 'report';

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
  folds: number;
  ranks: number[];
  lambdas: number[];
  centerings: Centering[];
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
}

export type ParsedArgs = { kind: 'help' } | { kind: 'version' } | { kind: 'run'; options: CliOptions };

const CENTERINGS: readonly Centering[] = ['none', 'row', 'column', 'both'];
const MODELS: readonly ModelFamily[] = ['lowrank', 'gaussian'];
const VALUE_OPTIONS = new Set(['out', 'rank', 'lambda', 'centering', 'iterations', 'tolerance', 'seed', 'scale', 'decimals', 'folds', 'ranks', 'lambdas', 'model', 'shrinkage', 'models', 'shrinkages', 'run', 'csv']);
const FLAG_OPTIONS = new Set(['long', 'json', 'transpose', 'compare-centering', 'tune']);
const ALLOWED: Record<Command, Set<string>> = {
  fill: new Set(['out', 'rank', 'lambda', 'centering', 'iterations', 'tolerance', 'seed', 'scale', 'long', 'json', 'decimals', 'model', 'shrinkage', 'transpose']),
  evaluate: new Set(['rank', 'lambda', 'centering', 'iterations', 'tolerance', 'seed', 'scale', 'long', 'json', 'folds', 'model', 'shrinkage', 'transpose']),
  tune: new Set(['ranks', 'lambdas', 'centering', 'folds', 'seed', 'iterations', 'tolerance', 'scale', 'long', 'json', 'models', 'shrinkages', 'transpose']),
  report: new Set(['out', 'rank', 'lambda', 'centering', 'iterations', 'tolerance', 'seed', 'scale', 'long', 'json', 'decimals', 'model', 'shrinkage', 'transpose', 'folds', 'run', 'csv', 'compare-centering', 'tune', 'ranks', 'lambdas']),
};

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
  if (!MODELS.includes(m)) throw new UsageError(`--${name} expects ${name === 'models' ? 'a list of ' : 'one of '}${MODELS.join(', ')}, got "${text}"`);
  return m;
}

function shrinkage(name: string, text: string): number {
  const x = number(name, text);
  if (!(x >= 0 && x < 1)) throw new UsageError(`--${name} expects a number ≥ 0 and < 1, got "${text}"`);
  return x;
}

function list<T>(name: string, text: string, item: (name: string, s: string) => T): T[] {
  const parts = text.split(',');
  if (parts.some((p) => p.trim() === '')) throw new UsageError(`--${name} expects a comma-separated list, got "${text}"`);
  return parts.map((p) => item(name, p));
}

function scale(text: string): CliOptions['scale'] {
  const parts = text.split(':');
  if (parts.length < 2 || parts.length > 3) throw new UsageError(`--scale expects MIN:MAX or MIN:MAX:STEP, got "${text}"`);
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
  if (argv.includes('--help') || argv.includes('-h') || argv[0] === 'help') return { kind: 'help' };
  if (argv[0] === '--version' || argv[0] === 'version') return { kind: 'version' };
  const command = argv[0];
  if (command !== 'fill' && command !== 'evaluate' && command !== 'tune' && command !== 'report') throw new UsageError(`unknown command "${command}"`);
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
    folds: get('folds') !== undefined ? wholeNumber('folds', get('folds')!, 2) : 5,
    ranks: get('ranks') !== undefined ? list('ranks', get('ranks')!, (n, s) => wholeNumber(n, s, 0)) : [0, 1, 2, 3, 5, 8],
    lambdas: get('lambdas') !== undefined ? list('lambdas', get('lambdas')!, nonNegative) : [0.1, 1, 10, 30],
    centerings: ['none', 'row', 'column', 'both'],
    model: get('model') !== undefined ? model('model', get('model')!) : 'lowrank',
    transpose: flags.has('transpose'),
    shrinkages: get('shrinkages') !== undefined ? list('shrinkages', get('shrinkages')!, shrinkage) : [0, 0.05, 0.1, 0.2],
    compareCentering: flags.has('compare-centering'),
    tune: flags.has('tune'),
  };
  if (get('run') !== undefined) opts.run = get('run')!.trim();
  if (get('csv') !== undefined) opts.csv = get('csv');
  if (command === 'report' && (get('ranks') !== undefined || get('lambdas') !== undefined) && !opts.tune) throw new UsageError('--ranks and --lambdas apply to "report" with --tune only');
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
  if (get('scale') !== undefined) opts.scale = scale(get('scale')!);
  if (get('centering') !== undefined) {
    if (command === 'tune') opts.centerings = list('centering', get('centering')!, centering);
    else opts.centering = centering('centering', get('centering')!);
  }
  if (command === 'fill' && opts.out === undefined) throw new UsageError('"fill" needs --out OUT.csv');
  if (command === 'report' && opts.out === undefined) throw new UsageError('"report" needs --out REPORT.html');
  return { kind: 'run', options: opts };
}
