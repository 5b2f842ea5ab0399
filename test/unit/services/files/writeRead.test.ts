/**
 * Hardening of the one atomic writer and of the bounded reader (issue 11).
 * Each case is a defect found by the probe: symlinks, planted links, predictable
 * temp names, missing fsync, unbounded reads of devices, FIFOs that hang.
 * Expectations are POSIX semantics (open(2) O_EXCL/O_NOFOLLOW/O_NONBLOCK, rename(2),
 * fstat(2)), from memory.
 */
import { execFileSync } from 'node:child_process';
import fsCallback from 'node:fs';
import {
  existsSync,
  lstatSync,
  mkdirSync,
  mkdtempSync,
  readFileSync,
  readdirSync,
  readlinkSync,
  rmSync,
  symlinkSync,
  writeFileSync,
} from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { atomicWrite, atomicWriteSync, isTempName } from '../../../../src-main/services/atomicWrite';
import { writeExport } from '../../../../src-main/services/exportService';
import { openProjectFile, saveProjectFile } from '../../../../src-main/services/projectStore';
import { readBoundedFile, readBoundedFileSync, readTextFile } from '../../../../src-main/services/readTextFile';
import { runCli } from '../../../../src-main/cli/main';
import { crashTestVersion } from './crash.versions';

const work = mkdtempSync(path.join(os.tmpdir(), 'rankfill-harden-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

function folder(name: string): string {
  const d = path.join(work, name);
  mkdirSync(d, { recursive: true });
  return d;
}

const temps = (dir: string) => readdirSync(dir).filter(isTempName);

async function cli(...argv: string[]) {
  let stdout = '';
  let stderr = '';
  const code = await runCli(argv, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t) });
  return { code, stdout, stderr };
}

describe('atomic writes through links', () => {
  it('saving a project through a symlink updates the file the link points to; the link stays a link', async () => {
    const dir = folder('link-save');
    const real = path.join(dir, 'real.rankfill');
    const link = path.join(dir, 'link.rankfill');
    await saveProjectFile(real, crashTestVersion(0));
    symlinkSync('real.rankfill', link);
    const r = await saveProjectFile(link, crashTestVersion(1));
    expect(r.ok).toBe(true);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readlinkSync(link)).toBe('real.rankfill');
    const opened = await openProjectFile(real);
    expect(opened.ok && opened.project.notes).toBe('version 1');
    // The backup is kept beside the real file, of the version it replaced.
    const bak = await openProjectFile(real + '.bak');
    expect(bak.ok && bak.project.notes).toBe('version 0');
    expect(temps(dir)).toEqual([]);
  });

  it('the synchronous writer (command line) also writes through a link to its target', () => {
    const dir = folder('link-sync');
    writeFileSync(path.join(dir, 'target.csv'), 'old');
    symlinkSync(path.join(dir, 'target.csv'), path.join(dir, 'out.csv'));
    atomicWriteSync(path.join(dir, 'out.csv'), 'new');
    expect(lstatSync(path.join(dir, 'out.csv')).isSymbolicLink()).toBe(true);
    expect(readFileSync(path.join(dir, 'target.csv'), 'utf8')).toBe('new');
  });

  it('a link to nothing, a folder and a FIFO are refused with a plain reason, and nothing is created', async () => {
    const dir = folder('link-refuse');
    symlinkSync(path.join(dir, 'missing.csv'), path.join(dir, 'dangling.csv'));
    await expect(atomicWrite(path.join(dir, 'dangling.csv'), 'x')).rejects.toMatchObject({ code: 'EDANGLING' });
    expect(existsSync(path.join(dir, 'missing.csv'))).toBe(false);
    mkdirSync(path.join(dir, 'sub'));
    await expect(atomicWrite(path.join(dir, 'sub'), 'x')).rejects.toMatchObject({ code: 'EISDIR' });
    execFileSync('mkfifo', [path.join(dir, 'pipe')]);
    expect(() => atomicWriteSync(path.join(dir, 'pipe'), 'x')).toThrow(expect.objectContaining({ code: 'ENOTREG' }));
    expect(temps(dir)).toEqual([]);
  });

  it('the command line never follows a link planted at its old predictable temp name', async () => {
    // Before: the CLI wrote OUT.rankfill-<pid>.tmp with a plain write, following a planted link
    // (the victim was overwritten) and then renamed the link itself over OUT.
    const dir = folder('planted');
    const victim = path.join(dir, 'victim.txt');
    writeFileSync(victim, 'keep me');
    const input = path.join(dir, 'in.csv');
    writeFileSync(input, 'row,a,b\nx,1,2\ny,2,\n');
    const out = path.join(dir, 'out.csv');
    symlinkSync(victim, `${out}.rankfill-${process.pid}.tmp`);
    const r = await cli('fill', input, '--out', out, '--rank', '0');
    expect(r.code).toBe(0);
    expect(readFileSync(victim, 'utf8')).toBe('keep me');
    expect(lstatSync(out).isFile()).toBe(true);
    expect(readFileSync(out, 'utf8').split(/\r?\n/)[1]).toBe('x,1,2');
  });

  it('temp names carry a random part and are created exclusively in the target folder', async () => {
    const dir = folder('names');
    const opened: string[] = [];
    const orig = fsCallback.promises.open.bind(fsCallback.promises);
    const spy = vi.spyOn(fsCallback.promises, 'open').mockImplementation(async (...args: Parameters<typeof orig>) => {
      opened.push(`${String(args[0])}|${String(args[1])}`);
      return orig(...args);
    });
    try {
      await atomicWrite(path.join(dir, 'a.csv'), '1', { backup: false });
      await atomicWrite(path.join(dir, 'a.csv'), '2', { backup: false });
    } finally {
      spy.mockRestore();
    }
    const tempOpens = opened.filter((o) => isTempName(path.basename(o.split('|')[0])));
    expect(tempOpens).toHaveLength(2);
    const [n1, n2] = tempOpens.map((o) => o.split('|')[0]);
    expect(n1).not.toBe(n2);
    expect(path.dirname(n1)).toBe(dir);
    const flags = Number(tempOpens[0].split('|')[1]);
    const c = fsCallback.constants;
    expect(flags & c.O_EXCL).toBe(c.O_EXCL);
    expect(flags & c.O_CREAT).toBe(c.O_CREAT);
    expect(flags & c.O_NOFOLLOW).toBe(c.O_NOFOLLOW);
  });

  it('the command line fsyncs its output file (it never did)', async () => {
    const dir = folder('fsync-cli');
    const input = path.join(dir, 'in.csv');
    writeFileSync(input, 'row,a,b\nx,1,2\ny,2,\n');
    const spy = vi.spyOn(fsCallback, 'fsyncSync');
    try {
      const r = await cli('fill', input, '--out', path.join(dir, 'out.csv'), '--rank', '0');
      expect(r.code).toBe(0);
      // One for the file, one for the folder.
      expect(spy.mock.calls.length).toBeGreaterThanOrEqual(2);
    } finally {
      spy.mockRestore();
    }
  });

  it('a temp left by a killed writer is removed by the next write to that folder', async () => {
    const dir = folder('next-write');
    const left = path.join(dir, '.panel.csv.2147483646.00112233aabb.tmp');
    writeFileSync(left, 'half');
    await atomicWrite(path.join(dir, 'other.csv'), 'x', { backup: false });
    expect(existsSync(left)).toBe(false);
  });
});

describe('exports', () => {
  it('an export onto a folder answers one plain sentence, with no temp path and no raw EISDIR', async () => {
    const dir = folder('export-folder');
    mkdirSync(path.join(dir, 'looks-like.csv'));
    const r = await writeExport({ path: path.join(dir, 'looks-like.csv'), text: 'a\n', overwrite: true });
    expect(r).toEqual({
      ok: false,
      reason: 'invalid-path',
      message: `${path.join(dir, 'looks-like.csv')} is a folder, not a file: add a file name`,
    });
    expect(temps(dir)).toEqual([]);
  });

  it('other write failures come back as a plain sentence naming the file', async () => {
    const dir = folder('export-fifo');
    execFileSync('mkfifo', [path.join(dir, 'out.csv')]);
    const err = await writeExport({ path: path.join(dir, 'out.csv'), text: 'a\n', overwrite: true }).catch(
      (e: Error) => e,
    );
    expect((err as Error).message).toBe(
      `Cannot write ${path.join(dir, 'out.csv')}: this is not a regular file (a device, pipe or socket).`,
    );
  });
});

describe('bounded reads', () => {
  it('refuses a device without reading it (before: /dev/zero grew without bound)', async () => {
    const t0 = performance.now();
    const r = await openProjectFile('/dev/zero');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toBe('this is a device, not a file; only regular files are opened');
    expect(performance.now() - t0).toBeLessThan(2000);
    const cliRead = await cli('fill', '/dev/zero', '--out', path.join(work, 'never.csv'));
    expect(cliRead.code).toBe(2);
    expect(cliRead.stderr).toBe('/dev/zero:1:1: this is a device, not a file; only regular files are opened\n');
    expect(existsSync(path.join(work, 'never.csv'))).toBe(false);
  });

  it('refuses a FIFO at once instead of blocking every later open', async () => {
    const dir = folder('fifo');
    const fifo = path.join(dir, 'pipe.rankfill');
    execFileSync('mkfifo', [fifo]);
    const r = await openProjectFile(fifo);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0].message).toBe('this is a pipe (FIFO), not a file; only regular files are opened');
    expect(readBoundedFileSync(fifo, 100)).toEqual({
      ok: false,
      reason: 'this is a pipe (FIFO), not a file; only regular files are opened',
    });
    // A later open of a real file is not held up.
    writeFileSync(path.join(dir, 'ok.txt'), 'fine');
    expect((await readTextFile(path.join(dir, 'ok.txt'), 100)).ok).toBe(true);
  });

  it('holds the cap while reading, whatever size the file claims', async () => {
    // /proc files report size 0 but have content: the cap must hold during the read itself.
    const r = await readBoundedFile('/proc/self/maps', 10);
    expect(r).toEqual({ ok: false, reason: 'file is too large to open (more than 10 bytes; the limit is 10 bytes)' });
    const s = readBoundedFileSync('/proc/self/maps', 10);
    expect(s.ok).toBe(false);
    const whole = await readBoundedFile('/proc/self/maps', 10 * 1024 * 1024);
    expect(whole.ok && whole.bytes.length).toBeGreaterThan(10);
  });

  it('the command line reads - (standard input, a pipe) with the same cap', () => {
    const bin = path.resolve(__dirname, '../../../../bin/rankfill.js');
    const dir = folder('stdin');
    const out = path.join(dir, 'out.csv');
    execFileSync(process.execPath, [bin, 'fill', '-', '--out', out, '--rank', '0'], {
      input: 'row,a,b\nx,1,2\ny,2,\n',
    });
    expect(readFileSync(out, 'utf8').split(/\r?\n/)[1]).toMatch(/^x,1,2$/);
    // Over the 50 MB cap: refused after reading 50 MB + 1 byte, not read to the end.
    let failure: { status: number; stderr: Buffer } | undefined;
    try {
      execFileSync(process.execPath, [bin, 'fill', '-', '--out', path.join(dir, 'big.csv')], {
        input: Buffer.alloc(51 * 1024 * 1024, 0x31),
        stdio: ['pipe', 'pipe', 'pipe'],
      });
    } catch (err) {
      failure = err as { status: number; stderr: Buffer };
    }
    expect(failure?.status).toBe(2);
    expect(String(failure?.stderr)).toBe(
      '(standard input):1:1: file is too large to open (more than 50 MB; the limit is 50 MB)\n',
    );
  }, 60_000);
});
