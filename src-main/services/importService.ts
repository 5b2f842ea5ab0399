/**
 * Turning delimited text handed over by the page into a document, or into the
 * list of problems (`line:column: reason`) that stop it from opening.
 */
import type { ApiReply, ApiRequest } from '../../src-shared/api';
import { matrixToPayload } from '../../src-shared/apiCodec';
import { parseDelimited } from '../../src-shared/io/parseDelimited';

export function importText(req: ApiRequest<'document.importText'>): ApiReply<'document.importText'> {
  const parsed = parseDelimited(req.text, {
    fileName: req.fileName,
    layout: req.layout ?? 'auto',
    delimiter: req.delimiter ?? 'auto',
  });
  if (!parsed.ok) return { ok: false, problems: parsed.problems };
  return {
    ok: true,
    document: {
      source: { kind: 'upload', name: req.fileName },
      title: req.fileName.replace(/\.[^.]+$/, ''),
      matrix: matrixToPayload(parsed.matrix),
      warnings: parsed.warnings,
    },
  };
}
