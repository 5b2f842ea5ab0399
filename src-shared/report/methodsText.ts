/**
 * The methods paragraph, generated from the run's settings and results, ready to paste
 * into a study's methods section, and the references it cites. Every number in it comes
 * from the ReportInput; the words name the published methods:
 *   alternating least squares for the regularized factorization — Hastie, Mazumder, Lee &
 *     Zadeh (2015) study exactly this objective, ½‖P(Y − UVᵀ)‖² + λ/2 (‖U‖² + ‖V‖²);
 *   EM for the multivariate normal with missing values — Dempster, Laird & Rubin (1977);
 *   k-fold cross-validation and the one-standard-error rule — Hastie, Tibshirani &
 *     Friedman (2009), §7.10.
 */
import type { TunePayload } from '../api';
import type { FitSettings, LowRankSettings } from '../engine/types';
import { articleFor, count, fmt, listWords, percent } from './html';
import type { ReportInput } from './reportInput';
import { BASELINE_MODELS } from './reportEvaluation';
import { CENTERING_SHORT } from './settingsWords';

export const REFERENCES = {
  als: 'Hastie, T., Mazumder, R., Lee, J. D. & Zadeh, R. (2015). Matrix completion and low-rank SVD via fast alternating least squares. Journal of Machine Learning Research, 16, 3367–3402.',
  em: 'Dempster, A. P., Laird, N. M. & Rubin, D. B. (1977). Maximum likelihood from incomplete data via the EM algorithm. Journal of the Royal Statistical Society, Series B, 39(1), 1–38.',
  cv: 'Hastie, T., Tibshirani, R. & Friedman, J. (2009). The Elements of Statistical Learning (2nd ed.), §7.10 Cross-validation. Springer.',
} as const;

type ReferenceKey = keyof typeof REFERENCES | 'intervals';

export interface MethodsText {
  paragraph: string;
  /** The references the paragraph cites, in order of first citation. */
  references: string[];
}

/** "1 to 9 in steps of 1" / "0 to 10 in steps of 0.5" / "0 to 1 (any value)". */
export function scaleWords(s: { min: number; max: number; step: number }): string {
  return s.step > 0 ? `${s.min} to ${s.max} in steps of ${s.step}` : `${s.min} to ${s.max} (any value in between)`;
}

function baselineWords(s: LowRankSettings): string {
  switch (s.centering) {
    case 'none':
      return 'without removing any baseline';
    case 'row':
      return 'after removing each row’s mean';
    case 'column':
      return 'after removing each column’s mean';
    case 'both':
      return `after removing row and column baselines (the global mean plus row and column offsets, each offset shrunk toward zero with weight ${s.offsetLambda})`;
  }
}

function baselineOnlyWords(s: LowRankSettings): string {
  switch (s.centering) {
    case 'none':
      return 'zero (no baseline and no factors: rank 0 without centering)';
    case 'row':
      return 'each row’s mean';
    case 'column':
      return 'each column’s mean';
    case 'both':
      return `the global mean plus row and column offsets (each offset shrunk toward zero with weight ${s.offsetLambda})`;
  }
}

function sameLowRank(a: FitSettings, b: FitSettings): boolean {
  return (
    a.model === 'lowrank' &&
    b.model === 'lowrank' &&
    a.rank === b.rank &&
    a.lambda === b.lambda &&
    a.centering === b.centering
  );
}

/** 0.000001 → "1e-6"; ordinary numbers as they are. */
export function smallNumber(x: number): string {
  return x !== 0 && Math.abs(x) < 1e-3 ? x.toExponential().replace(/\.?0+e/, 'e') : String(x);
}

function stopWords(
  iterations: number,
  converged: boolean,
  tolerance: number,
  maxIterations: number,
  unit: string,
): string {
  return converged
    ? `it settled after ${iterations} ${unit}${iterations === 1 ? '' : 's'} (relative change below ${smallNumber(tolerance)})`
    : `it stopped at the limit of ${maxIterations} ${unit}s before the relative change fell below ${smallNumber(tolerance)}`;
}

function tuningSentence(run: FitSettings, t: TunePayload, cite: (k: ReferenceKey) => string): string {
  const rows = t.table.filter((r) => r.settings.model === 'lowrank');
  const ranks = [...new Set(rows.map((r) => (r.settings as LowRankSettings).rank))].sort((a, b) => a - b);
  const lambdas = [...new Set(rows.map((r) => (r.settings as LowRankSettings).lambda))].sort((a, b) => a - b);
  const centerings = [...new Set(rows.map((r) => (r.settings as LowRankSettings).centering))];
  const grid = `ranks ${ranks.join(', ')} × λ ${lambdas.join(', ')}${centerings.length > 1 || run.model !== 'lowrank' || centerings[0] !== run.centering ? ` × centering ${centerings.map((c) => CENTERING_SHORT[c]).join(', ')}` : ''}`;
  const best = t.table[t.bestIndex];
  const se = t.table[t.oneStandardErrorIndex];
  const rule = `the one-standard-error rule (${cite('cv')})`;
  const what = (s: FitSettings) =>
    s.model === 'lowrank'
      ? `rank ${s.rank}, λ ${s.lambda}, centering ${CENTERING_SHORT[s.centering]}`
      : `the Gaussian model, shrinkage ${s.shrinkage}`;
  if (se && sameLowRank(run, se.settings)) {
    return `The setting was chosen by ${t.k}-fold cross-validation (seed ${t.seed}, the same folds for every setting) from ${grid}, taking the simplest setting whose error lies within one standard error of the lowest, by ${rule}.`;
  }
  if (best && sameLowRank(run, best.settings)) {
    return `The setting was chosen by ${t.k}-fold cross-validation (seed ${t.seed}, the same folds for every setting) from ${grid} as the one with the lowest mean RMSE; ${rule} would pick ${se ? what(se.settings) : 'the same'}.`;
  }
  return `A ${t.k}-fold cross-validation of ${grid} was also run (seed ${t.seed}); its lowest error was at ${best ? what(best.settings) : 'no setting'}, and ${rule} points to ${se ? what(se.settings) : 'no setting'}; this run does not use either.`;
}

function centeringSentence(run: FitSettings, c: TunePayload): string {
  const best = c.table[c.bestIndex];
  const first = c.table[0]?.settings;
  if (!best || best.settings.model !== 'lowrank' || !first || first.model !== 'lowrank') return '';
  const used =
    run.model === 'lowrank' &&
    run.centering === best.settings.centering &&
    run.rank === first.rank &&
    run.lambda === first.lambda;
  return `The four centering modes (none, by row, by column, both) were compared at rank ${first.rank} and λ ${first.lambda} by ${c.k}-fold cross-validation; centering ${CENTERING_SHORT[best.settings.centering]} had the lowest error (RMSE ${fmt(best.meanRmse)})${used ? ' and is the one used here' : ''}.`;
}

export function methodsText(input: ReportInput): MethodsText {
  const refs: string[] = [];
  const cite = (k: ReferenceKey): string => {
    const texts = k === 'intervals' ? (input.intervals?.sources ?? []) : [REFERENCES[k]];
    for (const text of texts) if (text && !refs.includes(text)) refs.push(text);
    if (k === 'als') return 'Hastie, Mazumder, Lee & Zadeh, 2015';
    if (k === 'em') return 'Dempster, Laird & Rubin, 1977';
    if (k === 'cv') return 'Hastie, Tibshirani & Friedman, 2009, §7.10';
    return input.intervals?.citation ?? input.intervals?.sources.join('; ') ?? '';
  };
  const m = input.matrix;
  const rows = m.rowLabels.length;
  const cols = m.colLabels.length;
  let observed = 0;
  for (let c = 0; c < m.values.length; c++) if (m.values[c] === m.values[c]) observed++;
  const s = input.run.settings;
  const r = input.run;
  const parts: string[] = [];
  parts.push(
    `The ratings form a matrix of ${count(rows)} rows by ${count(cols)} columns on a scale of ${scaleWords(m.scale)}; ${count(observed)} of ${count(rows * cols)} cells (${percent(rows * cols ? observed / (rows * cols) : NaN)}) were observed.`,
  );
  if (s.model === 'lowrank') {
    if (s.rank === 0) {
      parts.push(`Blank cells were filled with ${baselineOnlyWords(s)}, with no factor term (rank 0).`);
    } else {
      const lambdaWords = `λ = ${s.lambda}${s.scaleLambdaByCount ? ', multiplied by each row’s and column’s observed count' : ''}`;
      parts.push(
        `Blank cells were filled with a rank-${s.rank} factorization of the ratings ${baselineWords(s)} (${lambdaWords}), fitted by alternating least squares (ALS; ${cite('als')}) from a ${s.init === 'spectral' ? 'spectral start (the leading singular vectors of the centred, zero-filled matrix)' : `random start (seed ${s.seed})`}; ${stopWords(r.iterations, r.converged, s.tolerance, s.maxIterations, 'sweep')}.`,
      );
    }
  } else {
    const draw = s.transpose ? 'column' : 'row';
    const variable = s.transpose ? 'rows' : 'columns';
    parts.push(
      `Blank cells were filled with their conditional expectation under a multivariate normal model in which each ${draw} is one draw over the ${variable}, its mean vector and covariance matrix estimated from the incomplete data by the EM algorithm (${cite('em')})${s.shrinkage > 0 ? `, with the covariance shrunk by a factor ${s.shrinkage} toward its diagonal` : ''}; ${stopWords(r.iterations, r.converged, s.tolerance, s.maxIterations, 'iteration')}.`,
    );
  }
  if (s.clipToScale || s.snapToStep) {
    parts.push(
      `Estimates were ${listWords([s.clipToScale ? 'clipped to the rating scale' : '', s.snapToStep ? 'rounded to its steps' : ''].filter(Boolean))}.`,
    );
  }
  if (input.choice && input.choice.candidates !== 0) {
    parts.push(
      `The settings were chosen automatically: ${input.choice.candidates ?? 'a few'} candidate settings (the baselines alone under each centering, then a few ranks and λ values under the best of them) were scored by a quick ${input.choice.folds}-fold cross-validation, and the one with the lowest error was kept.`,
    );
  }
  if (input.tuning) parts.push(tuningSentence(s, input.tuning, cite));
  if (input.centering) {
    const sentence = centeringSentence(s, input.centering);
    if (sentence) parts.push(sentence);
  }
  const e = input.evaluation;
  if (e && e.table[0] && e.table[0].meanRmse !== null) {
    const own = e.table[0];
    const base = e.table[1];
    parts.push(
      `Accuracy was estimated by ${e.k}-fold cross-validation over the observed cells (seed ${e.seed}; ${cite('cv')}): each fold of ratings was hidden in turn, the model refitted on the rest and scored on the hidden ratings, giving a root mean squared error (RMSE) of ${fmt(own.meanRmse)} (standard deviation ${fmt(own.sdRmse)} across folds) and a mean absolute error (MAE) of ${fmt(own.meanMae)}` +
        (base && base.meanRmse !== null
          ? `, against an RMSE of ${fmt(base.meanRmse)} for the ${BASELINE_MODELS[0].words.toLowerCase()} on the same folds.`
          : '.'),
    );
  } else {
    parts.push('The accuracy of the estimates was not cross-validated for this report.');
  }
  const iv = input.intervals;
  if (iv) {
    parts.push(
      `Each filled value was given ${articleFor(percent(iv.level, 0))} ${percent(iv.level, 0)} ${iv.method} (${cite('intervals')})` +
        (iv.coverage !== null ? `; on held-out ratings ${percent(iv.coverage)} fell inside their interval` : '') +
        (iv.meanWidth !== null ? `, with a mean width of ${fmt(iv.meanWidth, 2)} rating units` : '') +
        '.',
    );
  }
  parts.push(`Computed with ${input.app.name} ${input.app.version} (seed ${s.seed}).`);
  return { paragraph: parts.join(' '), references: refs };
}
