/**
 * Loader for the open rating data used by the benchmark and an optional test.
 * The data are read in place from ../shared/datasets (never copied into the repository).
 *
 * movie-ratings-small (GroupLens ml-latest-small; research use, cite F. M. Harper and
 * J. A. Konstan, 2015, "The MovieLens Datasets: History and Context", ACM TiiS 5(4)):
 * long format userId,movieId,rating,timestamp; here rows = films, columns = people,
 * scale 0.5–5 in half steps.
 */
import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import type { RatingMatrix } from '../src-shared/matrix/ratingMatrix';

const here = dirname(fileURLToPath(import.meta.url));
/** The shared datasets folder: $RANKFILL_DATASETS, else ../shared/datasets beside the repository. */
const datasetsDir = process.env.RANKFILL_DATASETS ?? resolve(here, '../../shared/datasets');
export const movieRatingsPath = resolve(datasetsDir, 'movie-ratings-small/ratings.csv');

export function movieRatingsAvailable(): boolean {
  return existsSync(movieRatingsPath);
}

export function loadMovieRatings(): RatingMatrix {
  const text = readFileSync(movieRatingsPath, 'utf8');
  const lines = text.split(/\r?\n/);
  const people = new Map<string, number>();
  const films = new Map<string, number>();
  const triples: [number, number, number][] = [];
  for (let t = 1; t < lines.length; t++) {
    const line = lines[t];
    if (line === '') continue;
    const [user, movie, rating] = line.split(',');
    if (!people.has(user)) people.set(user, people.size);
    if (!films.has(movie)) films.set(movie, films.size);
    triples.push([films.get(movie)!, people.get(user)!, Number(rating)]);
  }
  const rows = films.size;
  const cols = people.size;
  const values = new Float64Array(rows * cols).fill(NaN);
  for (const [i, j, y] of triples) values[i * cols + j] = y;
  return {
    rowLabels: [...films.keys()],
    colLabels: [...people.keys()],
    values,
    scale: { min: 0.5, max: 5, step: 0.5 },
  };
}
