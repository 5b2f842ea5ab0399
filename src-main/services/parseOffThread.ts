/**
 * Runs imports in a parse worker (src-main/workers/parse.worker.ts). The host
 * creates the Worker (under electron-vite: `import p from '../workers/parse.worker?modulePath'`,
 * then `new Worker(p)`) and hands it to ParseWorkerClient; requests are matched to
 * replies by id, and a worker that dies answers every pending request with a problem.
 */
import type { Worker } from 'node:worker_threads';
import type { ParseOptions, ParseResult } from '../../src-shared/io/parseDelimited';

export type ParseRequest =
  | { id: number; kind: 'text'; fileName: string; text: string; options: Omit<ParseOptions, 'fileName'> }
  | { id: number; kind: 'file'; path: string; options: Omit<ParseOptions, 'fileName'> };

export interface ParseResponse {
  id: number;
  result: ParseResult;
}

export class ParseWorkerClient {
  private nextId = 1;
  private readonly pending = new Map<number, { resolve: (r: ParseResult) => void; name: string }>();

  constructor(private readonly worker: Worker) {
    worker.on('message', (msg: ParseResponse) => {
      const p = this.pending.get(msg.id);
      if (!p) return;
      this.pending.delete(msg.id);
      p.resolve(msg.result);
    });
    const failAll = (why: string) => {
      for (const [id, p] of this.pending) {
        this.pending.delete(id);
        p.resolve({
          ok: false,
          problems: [{ file: p.name, line: 1, column: 1, message: `the import stopped: ${why}` }],
        });
      }
    };
    worker.on('error', (err) => failAll(err instanceof Error ? err.message : String(err)));
    worker.on('exit', (code) => failAll(`the parser exited (code ${code})`));
  }

  parseText(fileName: string, text: string, options: Omit<ParseOptions, 'fileName'> = {}): Promise<ParseResult> {
    return this.send({ id: this.nextId++, kind: 'text', fileName, text, options }, fileName);
  }

  parseFile(filePath: string, options: Omit<ParseOptions, 'fileName'> = {}): Promise<ParseResult> {
    return this.send({ id: this.nextId++, kind: 'file', path: filePath, options }, filePath);
  }

  terminate(): Promise<number> {
    return this.worker.terminate();
  }

  private send(req: ParseRequest, name: string): Promise<ParseResult> {
    return new Promise((resolve) => {
      this.pending.set(req.id, { resolve, name });
      this.worker.postMessage(req);
    });
  }
}
