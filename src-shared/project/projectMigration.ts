/**
 * Bringing project files of older format versions up to the current one, on plain JSON data,
 * before the schema check (so a migrated file is validated like a new one).
 *
 * v1 → v2: each run gets
 *   number    from its id ("run-11" → 11), else from a leading "Run 11" in its name, else its
 *             position (1, 2, …) — numbers already taken move to the next free one;
 *   name      v1 names were made by the app ("Run 11: rank 2, λ 1, …"), so such a name becomes ""
 *             (no user name); any other text was the user's and is kept;
 *   fittedAt  the v1 savedAt (in v1 that was the time of the Fill).
 * Everything else is unchanged; a v1 matrix has no rowHeader.
 */
import { PROJECT_FORMAT_VERSION } from './projectSchema';

type Json = Record<string, unknown>;

function migrateV1(data: Json): Json {
  const runs = data.runs;
  if (!Array.isArray(runs)) return { ...data, version: 2 };
  const taken = new Set<number>();
  const out = runs.map((r: unknown, k: number) => {
    if (typeof r !== 'object' || r === null || Array.isArray(r)) return r;
    const run = r as Json;
    const id = typeof run.id === 'string' ? run.id : '';
    const name = typeof run.name === 'string' ? run.name : '';
    const fromId = /^run-(\d{1,6})$/.exec(id);
    const fromName = /^Run (\d{1,6})\b/.exec(name);
    let number = fromId ? Number(fromId[1]) : fromName ? Number(fromName[1]) : k + 1;
    if (!(number >= 1)) number = k + 1;
    while (taken.has(number)) number++;
    taken.add(number);
    const generated = /^Run \d+(: |$)/.test(name);
    return { ...run, number, name: generated ? '' : name, fittedAt: run.savedAt };
  });
  return { ...data, version: 2, runs: out };
}

/** The data in the current format version (unchanged when it already is). */
export function migrateProject(data: Json): Json {
  const d = data.version === 1 ? migrateV1(data) : data;
  // Each step raises the version by one; the result is the current version.
  return d.version === PROJECT_FORMAT_VERSION ? d : data;
}
