/**
 * Wires the page together: the bridge to the host, the document store, the
 * grid, the toolbar and the status line.
 */
import type { DocumentPayload } from '../src-shared/api';
import { matrixFromPayload } from '../src-shared/apiCodec';
import { formatProblem } from '../src-shared/io/problem';
import { ApiCallError, type HostBridge } from './bridge/hostBridge';
import { RatingGrid } from './grid/ratingGrid';
import { Notice } from './panels/notice';
import { renderStatusLine } from './panels/statusLine';
import { DocumentStore } from './state/documentStore';

const byTestId = <T extends HTMLElement>(id: string): T => {
  const el = document.querySelector<T>(`[data-testid="${id}"]`);
  if (!el) throw new Error(`page is missing [data-testid=${id}]`);
  return el;
};

export interface App {
  bridge: HostBridge;
  store: DocumentStore;
  grid: RatingGrid;
  notice: Notice;
  openDocument(doc: DocumentPayload): void;
}

export async function startApp(bridge: HostBridge, styleNonce: string): Promise<App> {
  const notice = new Notice(byTestId('notice'));
  const store = new DocumentStore({ rowLabels: [], colLabels: [], values: new Float64Array(0), scale: { min: 1, max: 5, step: 1 } });
  const grid = new RatingGrid(byTestId('grid'), {
    store,
    styleNonce,
    onRefused: (message) => notice.show(message, 'error'),
  });

  const info = await bridge.call('app.info', {});
  const hostLine = info.host === 'electron' ? `Rankfill ${info.version}` : `Rankfill ${info.version} · browser host (loopback only)`;
  const statusRoot = byTestId('status-line');
  const refreshStatus = () => {
    renderStatusLine(statusRoot, store.current, hostLine);
    byTestId('doc-title').textContent = `${store.title}${store.dirty ? ' •' : ''}`;
    document.title = `${store.title} — Rankfill`;
  };
  store.subscribe(refreshStatus);

  const openDocument = (doc: DocumentPayload) => {
    store.replace(matrixFromPayload(doc.matrix), doc.title, doc.source);
    if (doc.warnings.length) notice.show(doc.warnings.map(formatProblem).join('\n'), 'info', 10000);
  };

  // Sample picker
  const picker = byTestId<HTMLSelectElement>('sample-picker');
  const { samples } = await bridge.call('samples.list', {});
  for (const s of samples) {
    const opt = document.createElement('option');
    opt.value = s.id;
    opt.textContent = s.title;
    opt.title = s.description;
    picker.append(opt);
  }
  picker.addEventListener('change', () => {
    void bridge
      .call('samples.open', { id: picker.value })
      .then(openDocument)
      .catch((err: unknown) => notice.show(messageOf(err), 'error'));
  });

  // File import (the page reads the file; the main side parses and checks it)
  const fileInput = byTestId<HTMLInputElement>('import-file');
  fileInput.addEventListener('change', () => {
    const file = fileInput.files?.[0];
    fileInput.value = '';
    if (!file) return;
    void file
      .text()
      .then((text) => bridge.call('document.importText', { fileName: file.name, text }))
      .then((reply) => {
        if (reply.ok) openDocument(reply.document);
        else notice.show(`${file.name} was not opened:\n${reply.problems.map(formatProblem).join('\n')}`, 'error', 0);
      })
      .catch((err: unknown) => notice.show(messageOf(err), 'error'));
  });

  // First start: open the first sample.
  if (samples.length > 0) {
    picker.value = samples[0].id;
    openDocument(await bridge.call('samples.open', { id: samples[0].id }));
  }
  refreshStatus();
  return { bridge, store, grid, notice, openDocument };
}

export function messageOf(err: unknown): string {
  if (err instanceof ApiCallError) return err.message;
  return err instanceof Error ? err.message : String(err);
}
