/**
 * Worker thread that parses delimited text off the main thread, so a 50 MB
 * import does not stall IPC or the HTTP host. Messages:
 *   in:  { id, kind: 'text', text, options }  or  { id, kind: 'file', path, options }
 *   out: { id, result: ParseResult }   (the matrix's Float64Array travels by structured clone)
 * Answers every request; never throws across the boundary.
 */
import { parentPort } from 'node:worker_threads';
import { parseDelimited } from '../../src-shared/io/parseDelimited';
import { importDelimitedFile } from '../services/projectStore';
import type { ParseRequest, ParseResponse } from '../services/parseOffThread';

parentPort?.on('message', async (req: ParseRequest) => {
  let reply: ParseResponse;
  try {
    const result =
      req.kind === 'text'
        ? parseDelimited(req.text, { ...req.options, fileName: req.fileName })
        : await importDelimitedFile(req.path, req.options);
    reply = { id: req.id, result };
  } catch (err) {
    reply = {
      id: req.id,
      result: {
        ok: false,
        problems: [
          {
            file: req.kind === 'text' ? req.fileName : req.path,
            line: 1,
            column: 1,
            message: `could not read this file (${err instanceof Error ? err.message : String(err)})`,
          },
        ],
      },
    };
  }
  parentPort?.postMessage(reply);
});
