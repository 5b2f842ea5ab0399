/**
 * API handlers for documents and projects (issue 4): import preview (parsed off
 * the UI thread), project open/save (atomic, with .bak), recovery snapshots,
 * recent files, and the desktop shell's native dialogs.
 *
 * Project documents cross the API as their file text (the versioned JSON of
 * src-shared/project): the page serializes with serializeProject, the main side
 * validates with parseProject before anything is written, and an opened file is
 * validated here before its text goes back to the page (never partly loaded).
 */
import { existsSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { ApiReply, ApiRequest } from '../../src-shared/api';
import { matrixToPayload } from '../../src-shared/apiCodec';
import {
  DEFAULT_MAX_BYTES,
  parseDelimited,
  utf8ByteLength,
  type ParseOptions,
  type ParseResult,
} from '../../src-shared/io/parseDelimited';
import { parseProject, serializeProject } from '../../src-shared/project/projectFile';
import type { ParseWorkerClient } from './parseOffThread';
import { openProjectFile, saveProjectFile, withProjectExtension } from './projectStore';
import type { RecentFiles } from './recentFiles';
import type { RecoveryStore } from './recovery';

/** What only a desktop host can do; the browser host leaves it out. */
export interface DesktopShell {
  chooseOpenPath(): Promise<string | null>;
  chooseSavePath(suggestedName: string): Promise<string | null>;
  /** Close the window without asking again. */
  closeWindow(): void;
  /** The recent-files list changed (rebuild the File menu). */
  recentChanged?(paths: string[]): void;
  /** What Undo and Redo would do now (shown in the Edit menu). */
  editLabelsChanged?(undo: string | null, redo: string | null): void;
}

export interface DocumentHandlerDeps {
  recovery: RecoveryStore;
  recent: RecentFiles;
  /** Parse worker; without one (tests) parsing runs inline. */
  parser?: () => ParseWorkerClient | undefined;
  shell?: DesktopShell;
  log?: (line: string) => void;
}

type DocumentMethod =
  | 'document.previewImport'
  | 'project.open'
  | 'project.save'
  | 'project.choosePath'
  | 'project.defaultFolder'
  | 'recovery.write'
  | 'recovery.list'
  | 'recovery.restore'
  | 'recovery.discard'
  | 'recent.list'
  | 'recent.clear'
  | 'app.setEditLabels'
  | 'app.closeWindow';

export type DocumentHandlers = { [M in DocumentMethod]: (req: ApiRequest<M>) => Promise<ApiReply<M>> };

/** Where the page's path dialog starts and relative paths resolve: ~/Documents when present, else home. */
function defaultProjectFolder(): string {
  const docs = path.join(os.homedir(), 'Documents');
  return existsSync(docs) ? docs : os.homedir();
}

function resolveUserPath(p: string): string {
  const expanded = p.startsWith('~/') || p === '~' ? path.join(os.homedir(), p.slice(2)) : p;
  return path.resolve(defaultProjectFolder(), expanded);
}

function titleOf(fileName: string): string {
  return path.basename(fileName).replace(/\.[^.]+$/, '') || 'Untitled';
}

export function createDocumentHandlers(deps: DocumentHandlerDeps): DocumentHandlers {
  const log = deps.log ?? (() => {});
  const noteRecent = async (p: string) => {
    try {
      const files = await deps.recent.add(p);
      deps.shell?.recentChanged?.(files.map((f) => f.path));
    } catch (err) {
      log(`recent files not updated: ${err instanceof Error ? err.message : String(err)}`);
    }
  };

  return {
    'document.previewImport': async (req) => {
      const options: Omit<ParseOptions, 'fileName'> = {
        layout: req.layout ?? 'auto',
        delimiter: req.delimiter ?? 'auto',
        decimalComma: req.decimalComma ?? 'auto',
        duplicates: req.duplicates ?? 'refuse',
        maxBytes: DEFAULT_MAX_BYTES,
      };
      if (req.missingTokens) options.missingTokens = req.missingTokens;
      if (req.scale) options.scale = req.scale;
      if (req.columnOrder) options.columnOrder = req.columnOrder;
      // The size limit is checked before the text goes anywhere.
      const bytes = utf8ByteLength(req.text);
      if (bytes > DEFAULT_MAX_BYTES) {
        const mb = (n: number) => `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
        return {
          ok: false,
          problems: [
            {
              file: req.fileName,
              line: 1,
              column: 1,
              message: `file is too large to import (${mb(bytes)}; the limit is ${mb(DEFAULT_MAX_BYTES)})`,
            },
          ],
        };
      }
      const client = deps.parser?.();
      let result: ParseResult;
      if (client) result = await client.parseText(req.fileName, req.text, options);
      else result = parseDelimited(req.text, { ...options, fileName: req.fileName });
      if (!result.ok) return { ok: false, problems: result.problems };
      return {
        ok: true,
        document: {
          source: { kind: 'upload', name: req.fileName },
          title: titleOf(req.fileName),
          matrix: matrixToPayload(result.matrix),
          warnings: result.warnings,
        },
        info: { ...result.info, detectedScale: { ...result.info.detectedScale }, offThread: Boolean(client) },
      };
    },

    'project.open': async ({ path: p }) => {
      const opened = await openProjectFile(resolveUserPath(p));
      if (!opened.ok) return { ok: false, problems: opened.problems };
      await noteRecent(opened.path);
      return { ok: true, path: opened.path, projectText: serializeProject(opened.project) };
    },

    'project.save': async ({ path: p, projectText }) => {
      const target = withProjectExtension(resolveUserPath(p));
      const parsed = parseProject(projectText, path.basename(target));
      if (!parsed.ok) return { ok: false, problems: parsed.problems };
      const saved = await saveProjectFile(target, parsed.project);
      if (!saved.ok) return { ok: false, problems: saved.problems };
      await noteRecent(saved.path);
      return { ok: true, path: saved.path, bytes: saved.bytes };
    },

    'project.choosePath': async ({ purpose, suggestedName }) => {
      if (!deps.shell) return { supported: false };
      const chosen =
        purpose === 'open-project'
          ? await deps.shell.chooseOpenPath()
          : await deps.shell.chooseSavePath(suggestedName ?? 'Untitled.rankfill');
      return { supported: true, path: chosen };
    },

    'project.defaultFolder': async () => ({ folder: defaultProjectFolder() }),

    'recovery.write': async ({ id, title, sourcePath, projectText }) => {
      const parsed = parseProject(projectText, `${id}.rankfill-recovery`);
      if (!parsed.ok)
        throw new Error(`the recovery snapshot was not written: ${parsed.problems[0]?.message ?? 'invalid project'}`);
      const entry = await deps.recovery.writeSnapshot(id, parsed.project, { title, sourcePath });
      return { file: entry.file };
    },

    'recovery.list': async () => ({
      entries: (await deps.recovery.list()).map((e) => ({
        id: e.id,
        title: e.title,
        sourcePath: e.sourcePath,
        savedAt: e.savedAt,
        bytes: e.bytes,
      })),
    }),

    'recovery.restore': async ({ id }) => {
      const restored = await deps.recovery.restore(id);
      if (!restored.ok) return { ok: false, problems: restored.problems };
      const entry = (await deps.recovery.list()).find((e) => e.id === id);
      return {
        ok: true,
        projectText: serializeProject(restored.project),
        entry: {
          id,
          title: restored.meta.title,
          sourcePath: restored.meta.sourcePath,
          savedAt: restored.meta.savedAt,
          bytes: entry?.bytes ?? 0,
        },
      };
    },

    'recovery.discard': async ({ id }) => {
      await deps.recovery.discard(id);
      return { discarded: true };
    },

    'recent.list': async () => ({ files: await deps.recent.list() }),

    'recent.clear': async () => {
      await deps.recent.clear();
      deps.shell?.recentChanged?.([]);
      return { cleared: true };
    },

    'app.setEditLabels': async ({ undo, redo }) => {
      if (!deps.shell?.editLabelsChanged) return { supported: false };
      deps.shell.editLabelsChanged(undo, redo);
      return { supported: true };
    },

    'app.closeWindow': async () => {
      if (!deps.shell) return { supported: false };
      deps.shell.closeWindow();
      return { supported: true };
    },
  };
}
