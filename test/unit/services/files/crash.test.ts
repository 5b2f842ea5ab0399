/**
 * Crash safety of the atomic save and of the recovery snapshots.
 *
 * A child Node process saves two alternating project versions in a loop; we kill
 * it with SIGKILL at random moments, 40 times, and after each kill the file on
 * disk must parse as exactly one of the two versions (corrupt count must be 0).
 * Source for the expectation: POSIX rename(2) replaces the target atomically, so a
 * reader sees the old or the new file, never a mix. (SIGKILL leaves the page cache
 * intact; power loss is what the fsync calls guard, which a test cannot simulate.)
 *
 * The child is bundled once with esbuild (fast start); if esbuild is unavailable it
 * runs through `node --import tsx` instead (slower).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatProblem } from '../../../../src-shared/io/problem';
import { parseProject } from '../../../../src-shared/project/projectFile';
import { RecoveryStore } from '../../../../src-main/services/recovery';
import { crashTestVersion } from './crash.versions';
import { createRng } from '../../../../src-shared/engine/random';

const CHILD_TS = path.resolve(__dirname, 'crash.child.ts');
const TRIALS = 40;

let work: string;
let childArgs: string[];

beforeAll(async () => {
  work = mkdtempSync(path.join(os.tmpdir(), 'rankfill-crash-'));
  try {
    const esbuild = await import('esbuild');
    const out = path.join(work, 'crash.child.mjs');
    await esbuild.build({ entryPoints: [CHILD_TS], bundle: true, platform: 'node', format: 'esm', outfile: out, logLevel: 'silent' });
    childArgs = [out];
  } catch {
    childArgs = ['--import', 'tsx', CHILD_TS];
  }
});

afterAll(() => {
  if (work) rmSync(work, { recursive: true, force: true });
});

/** Deterministic pseudo-random delays (the engine's seeded generator), so a failing run can be repeated. */
function rng(seed: number): () => number {
  const r = createRng(seed);
  return () => r.next();
}

function startChild(args: string[]): ChildProcess {
  return spawn(process.execPath, [...childArgs, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
}

function waitForLine(child: ChildProcess, test: (line: string) => boolean, onLine?: (line: string) => void): Promise<void> {
  return new Promise((resolve, reject) => {
    let buf = '';
    let err = '';
    child.stderr?.on('data', (d) => (err += String(d)));
    child.once('exit', (code) => reject(new Error(`child exited early (${code}): ${err}`)));
    child.stdout?.on('data', (d) => {
      buf += String(d);
      let nl: number;
      while ((nl = buf.indexOf('\n')) >= 0) {
        const line = buf.slice(0, nl);
        buf = buf.slice(nl + 1);
        onLine?.(line);
        if (test(line)) resolve();
      }
    });
  });
}

function kill(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once('exit', () => resolve());
    child.kill('SIGKILL');
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Which version (0 or 1) a file holds, or a description of why it is neither. */
function versionOf(file: string): 0 | 1 | string {
  const r = parseProject(readFileSync(file, 'utf8'), path.basename(file));
  if (!r.ok) return r.problems.map(formatProblem).join('; ');
  for (const v of [0, 1] as const) {
    const want = crashTestVersion(v);
    const got = r.project;
    if (
      got.notes === want.notes &&
      got.matrix.rowLabels.join('\n') === want.matrix.rowLabels.join('\n') &&
      Array.from(got.matrix.values).every((x, k) => Object.is(x, want.matrix.values[k])) &&
      got.matrix.values.length === want.matrix.values.length
    ) {
      return v;
    }
  }
  return 'parses, but is neither version';
}

describe('crash safety', () => {
  it(`the saved file is always the old or the new version after ${TRIALS} random SIGKILLs`, async () => {
    const target = path.join(work, 'panel.rankfill');
    const random = rng(20260202);
    let corrupt = 0;
    let corruptBackups = 0;
    const seen = [0, 0];
    const t0 = performance.now();
    for (let trial = 0; trial < TRIALS; trial++) {
      const child = startChild(['save', target]);
      await waitForLine(child, (l) => l === 'ready');
      await sleep(Math.floor(random() * 60));
      await kill(child);
      const v = versionOf(target);
      if (typeof v === 'string') corrupt++;
      else seen[v]++;
      const bak = target + '.bak';
      if (readdirSync(work).includes('panel.rankfill.bak') && typeof versionOf(bak) === 'string') corruptBackups++;
    }
    const leftovers = readdirSync(work).filter((n) => n.endsWith('.tmp')).length;
    console.log(
      `crash-safety loop: ${TRIALS} trials, corrupt files: ${corrupt}, corrupt backups: ${corruptBackups}, ` +
        `old/new seen: ${seen[0]}/${seen[1]}, leftover temp files: ${leftovers}, ${Math.round(performance.now() - t0)} ms`,
    );
    expect(corrupt).toBe(0);
    expect(corruptBackups).toBe(0);
    // Both versions must have been observed, or the kills did not land during the loop.
    expect(seen[0]).toBeGreaterThan(0);
    expect(seen[1]).toBeGreaterThan(0);
  });

  it('the recovery file restores the last edits after a SIGKILL', async () => {
    const dir = path.join(work, 'recovery');
    for (let trial = 0; trial < 3; trial++) {
      let lastSaved = -1;
      let savedCount = 0;
      const child = startChild(['recovery', dir]);
      await waitForLine(
        child,
        () => savedCount >= 5,
        (line) => {
          const m = /^saved (\d+)$/.exec(line);
          if (m) {
            lastSaved = Number(m[1]);
            savedCount++;
          }
        },
      );
      await sleep(10 + trial * 15);
      await kill(child);
      const store = new RecoveryStore({ dir });
      const entries = await store.list();
      expect(entries.map((e) => e.id)).toEqual(['crash-doc']);
      const restored = await store.restore('crash-doc');
      if (!restored.ok) throw new Error(restored.problems.map(formatProblem).join('\n'));
      // The snapshot holds the last reported edit or a later one (written but not yet reported).
      expect(restored.project.matrix.values[0]).toBeGreaterThanOrEqual(lastSaved);
      expect(restored.meta.title).toBe('crash test');
      // Everything but the edited cell is as the child started.
      const base = crashTestVersion(0);
      expect(Array.from(restored.project.matrix.values.subarray(1))).toEqual(Array.from(base.matrix.values.subarray(1)));
      await store.discard('crash-doc');
      expect(await store.list()).toEqual([]);
    }
  });
});
