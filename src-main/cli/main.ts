/**
 * `rankfill` command line: argument handling, exit codes and the one-line error policy.
 * Exit status: 0 success; 1 the fit failed (non-finite values, divergence, bad model
 * settings); 2 malformed input (`FILE:LINE:COLUMN: reason`) or a usage error (reason +
 * usage line). No stack trace ever reaches the user.
 */
import { FitCancelledError, FitFailedError } from '../../src-shared/engine/errors';
import { HELP, USAGE, UsageError, commandHelp, parseArgs } from './args';
import { appVersion } from './version';
import { readMatrix } from './readInput';
import { withScale } from './modelSettings';
import { runEvaluate, runFill, runTune, type CommandOutput } from './commands';
import { runReport } from './reportCommand';
import type { EnginePool } from '../pool/enginePool';

export interface CliIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

const processIo: CliIo = {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
};

function oneLine(message: string): string {
  return message.split('\n')[0];
}

/** What the host gives the command line: a way to start the engine pool (the built CLI does). */
export interface CliEnv {
  createPool?: () => EnginePool;
}

async function execute(argv: string[], env: CliEnv): Promise<CommandOutput> {
  let parsed;
  try {
    parsed = parseArgs(argv);
  } catch (err) {
    if (err instanceof UsageError) return { code: 2, stdout: [], stderr: [`rankfill: ${err.message}`, USAGE] };
    throw err;
  }
  if (parsed.kind === 'help')
    return { code: 0, stdout: [parsed.command ? commandHelp(parsed.command) : HELP], stderr: [] };
  if (parsed.kind === 'version') return { code: 0, stdout: [`rankfill ${appVersion()}`], stderr: [] };
  const o = parsed.options;
  if (o.command === 'report') {
    try {
      return runReport(o, appVersion());
    } catch (err) {
      if (err instanceof UsageError) return { code: 2, stdout: [], stderr: [`rankfill: ${err.message}`, USAGE] };
      return fitFailure(err);
    }
  }
  const timings: Record<string, number> = {};
  const t0 = performance.now();
  const read = readMatrix(
    o.input,
    o.long,
    o.duplicates,
    o.scale ? { min: o.scale.min, max: o.scale.max, step: o.scale.step ?? 0 } : undefined,
  );
  timings.readMs = performance.now() - t0;
  if (!read.ok) return { code: 2, stdout: [], stderr: read.messages };
  const matrix = withScale(read.matrix, o);
  let out: CommandOutput;
  const pool = o.command === 'fill' ? undefined : env.createPool?.();
  try {
    if (o.command === 'fill') out = runFill(o, matrix, timings, t0);
    else if (o.command === 'evaluate') out = await runEvaluate(o, matrix, timings, t0, pool);
    else out = await runTune(o, matrix, timings, t0, pool);
  } catch (err) {
    return fitFailure(err);
  } finally {
    await pool?.close();
  }
  return { ...out, stderr: [...read.warnings, ...out.stderr] };
}

function fitFailure(err: unknown): CommandOutput {
  if (err instanceof FitFailedError || err instanceof FitCancelledError) {
    return { code: 1, stdout: [], stderr: [`rankfill: fit failed: ${oneLine(err.message)}`] };
  }
  // Engine errors about the request itself (e.g. more folds than observed cells, a gaussian
  // family that is not available) are fit failures too, reported in one line.
  return { code: 1, stdout: [], stderr: [`rankfill: fit failed: ${oneLine((err as Error).message ?? String(err))}`] };
}

/** Runs the command line; resolves to the exit status. Never throws. */
export async function runCli(argv: string[], io: CliIo = processIo, env: CliEnv = {}): Promise<number> {
  try {
    const out = await execute(argv, env);
    for (const line of out.stderr) io.stderr(`${line}\n`);
    for (const line of out.stdout) io.stdout(`${line}\n`);
    return out.code;
  } catch (err) {
    io.stderr(`rankfill: internal error: ${oneLine(err instanceof Error ? err.message : String(err))}\n`);
    return 1;
  }
}
