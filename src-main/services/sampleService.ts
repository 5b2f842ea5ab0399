/**
 * The invented demo matrices in samples/: listing them and opening one as a
 * document. The catalog (samples/catalog.json) carries each sample's scale.
 */
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { z } from 'zod';
import { scaleSchema, type DocumentPayload, type SampleInfo } from '../../src-shared/api';
import { matrixToPayload } from '../../src-shared/apiCodec';
import { formatProblem } from '../../src-shared/io/problem';
import { parseDelimited } from '../../src-shared/io/parseDelimited';
import { UserFacingError } from './apiRouter';

const catalogSchema = z.object({
  samples: z.array(
    z.object({ id: z.string(), file: z.string(), title: z.string(), description: z.string(), scale: scaleSchema }),
  ),
});
type Catalog = z.infer<typeof catalogSchema>;

export class SampleService {
  private catalog: Catalog | undefined;

  constructor(private readonly samplesDir: string) {}

  private async load(): Promise<Catalog> {
    if (!this.catalog) {
      const text = await readFile(join(this.samplesDir, 'catalog.json'), 'utf8');
      this.catalog = catalogSchema.parse(JSON.parse(text));
    }
    return this.catalog;
  }

  async list(): Promise<SampleInfo[]> {
    const c = await this.load();
    return c.samples.map(({ id, title, description, scale }) => ({ id, title, description, scale }));
  }

  async open(id: string): Promise<DocumentPayload> {
    const c = await this.load();
    const entry = c.samples.find((s) => s.id === id);
    if (!entry) throw new UserFacingError(`no sample called "${id}"`);
    const text = await readFile(join(this.samplesDir, entry.file), 'utf8');
    const parsed = parseDelimited(text, { fileName: entry.file, layout: 'wide' });
    if (!parsed.ok) throw new UserFacingError(parsed.problems.map(formatProblem).join('\n'));
    const matrix = { ...parsed.matrix, scale: { ...entry.scale } };
    return {
      source: { kind: 'sample', name: entry.id },
      title: entry.title,
      matrix: matrixToPayload(matrix),
      warnings: parsed.warnings,
    };
  }
}
