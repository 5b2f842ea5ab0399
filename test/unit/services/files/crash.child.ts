/**
 * Child process for crash.test.ts (not a test itself). Modes:
 *   save TARGET      — saves two alternating project versions to TARGET with the atomic
 *                      save, forever, printing "ready" after the first save completes;
 *   recovery DIR     — makes edit after edit to a document, with autosave to the recovery
 *                      folder DIR, printing "saved N" each time snapshot N is on disk;
 *   export TARGET    — the host's export writer (export.write with its settings sidecar),
 *                      two alternating texts, forever, "ready" after the first;
 *   cli IN0 IN1 OUT  — the command line's `fill` (in process), alternating the two inputs,
 *                      forever, "ready" after the first.
 * The parent kills it with SIGKILL at a random moment.
 */
import { crashTestVersion } from './crash.versions';
import { saveProjectFile } from '../../../../src-main/services/projectStore';
import { RecoveryStore } from '../../../../src-main/services/recovery';
import { Autosaver } from '../../../../src-main/services/autosave';
import { writeExport } from '../../../../src-main/services/exportService';
import { runCli } from '../../../../src-main/cli/main';
import { crashExportText } from './crash.versions';

async function exportLoop(target: string): Promise<void> {
  for (let k = 0; ; k++) {
    const text = crashExportText(k % 2);
    await writeExport({ path: target, text, sidecar: JSON.stringify({ version: k % 2 }) + '\n', overwrite: true });
    if (k === 0) process.stdout.write('ready\n');
  }
}

async function cliLoop(inputs: [string, string], out: string): Promise<void> {
  const quiet = { stdout: () => {}, stderr: (t: string) => process.stderr.write(t) };
  for (let k = 0; ; k++) {
    const code = await runCli(['fill', inputs[k % 2], '--out', out, '--rank', '1', '--seed', '1', '--force'], quiet);
    if (code !== 0) process.exit(3);
    if (k === 0) process.stdout.write('ready\n');
  }
}

async function saveLoop(target: string): Promise<void> {
  let k = 0;
  for (;;) {
    const r = await saveProjectFile(target, crashTestVersion(k % 2), { now: null });
    if (!r.ok) {
      process.stderr.write(JSON.stringify(r.problems) + '\n');
      process.exit(2);
    }
    if (k === 0) process.stdout.write('ready\n');
    k++;
  }
}

async function recoveryLoop(dir: string): Promise<void> {
  const store = new RecoveryStore({ dir });
  const doc = crashTestVersion(0);
  // Edit numbers grow without bound: a scale wide enough that every one is a valid rating.
  doc.matrix.scale = { min: 0, max: 1e12, step: 0 };
  let edit = 0;
  let captured = 0; // the edit number inside the snapshot being written
  const autosaver = new Autosaver(store, 'crash-doc', {
    delayMs: 5,
    maxDelayMs: 20,
    onSaved: () => process.stdout.write(`saved ${captured}\n`),
  });
  for (;;) {
    edit++;
    doc.matrix.values[0] = edit; // one "keystroke": cell (0, 0) := edit number
    autosaver.changed({
      doc: () => {
        captured = doc.matrix.values[0];
        return doc;
      },
      title: 'crash test',
    });
    await new Promise((r) => setTimeout(r, 1));
  }
}

const [mode, where, ...rest] = process.argv.slice(2);
if (mode === 'save') void saveLoop(where);
else if (mode === 'recovery') void recoveryLoop(where);
else if (mode === 'export') void exportLoop(where);
else if (mode === 'cli') void cliLoop([where, rest[0]], rest[1]);
else {
  process.stderr.write('usage: crash.child.ts save TARGET | recovery DIR | export TARGET | cli IN0 IN1 OUT\n');
  process.exit(2);
}
