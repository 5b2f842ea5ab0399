import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

// Layering rule of this project (ARCHITECTURE.md; same idea as splitting code by
// runtime in large editors): src-shared imports neither Node, DOM nor Electron;
// src-renderer never imports src-main or Node; Electron only under hosts/electron.
const root = join(__dirname, '../../..');

function files(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const full = join(dir, name);
    if (statSync(full).isDirectory()) out.push(...files(full));
    else if (/\.ts$/.test(name)) out.push(full);
  }
  return out;
}

function imports(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  return [
    ...text.matchAll(
      /(?:import|export)\s[^'"]*?from\s+['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|^import\s+['"]([^'"]+)['"]/gm,
    ),
  ].map((m) => m[1] ?? m[2] ?? m[3]);
}

const NODE_BUILTINS = /^(node:|fs$|path$|os$|child_process$|worker_threads$|http$|crypto$|events$|url$|stream$)/;
const PURE_LIBS = new Set(['ml-matrix', 'zod', 'papaparse']);

describe('layers by runtime', () => {
  it('src-shared imports only itself and pure libraries', () => {
    const bad: string[] = [];
    for (const f of files(join(root, 'src-shared'))) {
      for (const spec of imports(f)) {
        if (spec.startsWith('.')) {
          if (/src-(main|renderer)/.test(join(f, '..', spec))) bad.push(`${relative(root, f)} → ${spec}`);
        } else if (!PURE_LIBS.has(spec)) bad.push(`${relative(root, f)} → ${spec}`);
      }
      const text = readFileSync(f, 'utf8');
      if (/(?<!['"\w.])(window|document|localStorage|process)\./.test(text.replace(/\/\/.*$|\/\*[\s\S]*?\*\//gm, '')))
        bad.push(`${relative(root, f)} uses a runtime global`);
    }
    expect(bad).toEqual([]);
  });

  it('src-renderer does not import src-main, Node or Electron', () => {
    const bad: string[] = [];
    for (const f of files(join(root, 'src-renderer'))) {
      for (const spec of imports(f)) {
        if (spec.includes('src-main') || NODE_BUILTINS.test(spec) || spec === 'electron')
          bad.push(`${relative(root, f)} → ${spec}`);
      }
    }
    expect(bad).toEqual([]);
  });

  it('only the Electron host folder imports electron', () => {
    const bad: string[] = [];
    for (const f of files(join(root, 'src-main'))) {
      if (relative(root, f).startsWith(join('src-main', 'hosts', 'electron'))) continue;
      if (imports(f).includes('electron')) bad.push(relative(root, f));
    }
    expect(bad).toEqual([]);
  });
});
