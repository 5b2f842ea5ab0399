/**
 * The model panel: the settings store rendered in plain words (the inputs
 * write to the store, and show whatever the store holds), the Fill and Stop
 * actions, a progress bar with the objective drawn live, and the overlay
 * controls with their legend.
 */
import type { Centering, ModelFamily } from '../../src-shared/engine/types';
import { ObjectiveChart } from '../charts/objectiveChart';
import type { FillState, FitController } from '../runs/fitController';
import {
  MAX_ITERATIONS,
  MAX_RANK,
  MAX_SHRINKAGE,
  type SettingsPatch,
  type SettingsStore,
} from '../state/settingsStore';
import type { ViewStore } from '../state/viewStore';
import { el, field, numberInput } from './dom';

export interface ModelPanelHooks {
  controller: FitController;
  settings: SettingsStore;
  view: ViewStore;
  /** What Fill does (default: fill with the settings as they stand). */
  fill?: () => void;
}

export class ModelPanel {
  private readonly family: HTMLSelectElement;
  private readonly rank: HTMLInputElement;
  private readonly lambda: HTMLInputElement;
  private readonly centering: HTMLSelectElement;
  private readonly iterations: HTMLInputElement;
  private readonly seed: HTMLInputElement;
  private readonly clip: HTMLInputElement;
  private readonly shrinkage: HTMLInputElement;
  private readonly transpose: HTMLInputElement;
  private readonly lowRankBox: HTMLElement;
  private readonly gaussianBox: HTMLElement;
  private readonly fillButton: HTMLButtonElement;
  private readonly stopButton: HTMLButtonElement;
  private readonly bar: HTMLProgressElement;
  private readonly progressText: HTMLElement;
  private readonly message: HTMLElement;
  private readonly familyNote: HTMLElement;
  private readonly choiceNote: HTMLElement;
  private cancelChoosing: (() => void) | null = null;
  private readonly chart: ObjectiveChart;

  constructor(
    root: HTMLElement,
    private readonly hooks: ModelPanelHooks,
  ) {
    const d = hooks.settings.state.lowRank;
    const g = hooks.settings.state.gaussian;
    this.family = el('select', { testid: 'model-family' }) as HTMLSelectElement;
    this.family.append(
      new Option('Low-rank with centering', 'lowrank'),
      new Option('Gaussian, for tall panels', 'gaussian'),
    );
    this.rank = numberInput('model-rank', d.rank, { min: 0, max: MAX_RANK, step: 1 });
    this.lambda = numberInput('model-lambda', d.lambda, { min: 0, step: 0.1 });
    this.centering = el('select', { testid: 'model-centering' }) as HTMLSelectElement;
    this.centering.append(
      new Option('none', 'none'),
      new Option('by row', 'row'),
      new Option('by column', 'column'),
      new Option('both (row and column)', 'both'),
    );
    this.centering.value = d.centering;
    this.iterations = numberInput('model-iterations', d.maxIterations, { min: 1, max: MAX_ITERATIONS, step: 1 });
    this.seed = numberInput('model-seed', d.seed, { step: 1 });
    this.clip = el('input', { testid: 'model-clip' }) as HTMLInputElement;
    this.clip.type = 'checkbox';
    this.clip.checked = d.clipToScale;
    this.shrinkage = numberInput('model-shrinkage', g.shrinkage, { min: 0, max: MAX_SHRINKAGE, step: 0.05 });
    this.transpose = el('input', { testid: 'model-transpose' }) as HTMLInputElement;
    this.transpose.type = 'checkbox';

    this.lowRankBox = el('div', { className: 'rf-fields' }, [
      field('Rank', this.rank, 'How many hidden traits explain the ratings. 0 = baselines only.'),
      field(
        'Regularization λ',
        this.lambda,
        'Pulls the traits toward zero; larger is more cautious with sparse rows and columns.',
      ),
      field(
        'Centering',
        this.centering,
        'What is taken out before the traits are fitted: each row’s mean, each column’s mean, both, or nothing.',
      ),
    ]);
    this.gaussianBox = el('div', { className: 'rf-fields', hidden: true }, [
      field(
        'Shrinkage',
        this.shrinkage,
        'Pulls the correlations between columns toward zero (0–0.95); helps small panels.',
      ),
      field('Variables are rows', this.transpose, 'Treat rows, not columns, as the measured variables.'),
      el('p', { className: 'rf-hint', testid: 'gaussian-centering-note' }, [
        'Centering does not apply: this model estimates each variable’s mean itself.',
      ]),
    ]);
    this.familyNote = el('p', { className: 'rf-hint', testid: 'family-note' });
    this.choiceNote = el('p', { className: 'rf-hint rf-note', testid: 'model-choice', hidden: true });
    this.wireInputs();

    this.fillButton = el('button', { className: 'rf-button rf-primary', testid: 'fill-button' }, [
      'Fill blank cells',
    ]) as HTMLButtonElement;
    this.stopButton = el('button', { className: 'rf-button', testid: 'cancel-button', disabled: true }, [
      'Stop',
    ]) as HTMLButtonElement;
    this.fillButton.addEventListener('click', () =>
      this.hooks.fill ? this.hooks.fill() : void this.hooks.controller.fill(this.hooks.settings.value),
    );
    this.stopButton.addEventListener('click', () =>
      this.cancelChoosing ? this.cancelChoosing() : void this.hooks.controller.cancelFill(),
    );
    this.bar = el('progress', { testid: 'fill-progress' }) as HTMLProgressElement;
    this.bar.max = 1;
    this.bar.value = 0;
    this.progressText = el('div', { className: 'rf-hint', testid: 'fill-progress-text' }, ['No fit yet.']);
    this.message = el('div', { className: 'rf-panel-error', testid: 'fill-message', hidden: true });
    const chartHost = el('div', { className: 'rf-chart', testid: 'objective-chart' });

    const overlayToggle = el('input', { testid: 'overlay-toggle' }) as HTMLInputElement;
    overlayToggle.type = 'checkbox';
    overlayToggle.checked = hooks.view.state.overlayVisible;
    overlayToggle.addEventListener('change', () => hooks.view.set({ overlayVisible: overlayToggle.checked }));
    hooks.view.subscribe((changed) => {
      if (changed.has('overlayVisible')) overlayToggle.checked = hooks.view.state.overlayVisible;
    });
    const liveToggle = el('input', { testid: 'live-toggle' }) as HTMLInputElement;
    liveToggle.type = 'checkbox';
    liveToggle.checked = hooks.controller.liveRefit;
    liveToggle.addEventListener('change', () => (hooks.controller.liveRefit = liveToggle.checked));
    const levelInput = numberInput('interval-level', Math.round(hooks.view.state.intervalLevel * 100), {
      min: 50,
      max: 99,
      step: 1,
    });
    levelInput.addEventListener('change', () => {
      const x = Number(levelInput.value);
      if (Number.isInteger(x) && x >= 50 && x <= 99) hooks.view.set({ intervalLevel: x / 100 });
      else levelInput.value = String(Math.round(hooks.view.state.intervalLevel * 100));
    });

    root.append(
      el('h2', {}, ['Model']),
      field('Family', this.family),
      this.familyNote,
      this.lowRankBox,
      this.choiceNote,
      this.gaussianBox,
      el('details', { className: 'rf-more' }, [
        el('summary', {}, ['More settings']),
        field('Iterations', this.iterations, 'Upper limit on fitting rounds; fitting stops earlier once it settles.'),
        field('Seed', this.seed, 'Same seed and data, same result.'),
        field('Keep estimates on the scale', this.clip, 'Clip filled values to the scale’s minimum and maximum.'),
      ]),
      el('div', { className: 'rf-row' }, [this.fillButton, this.stopButton]),
      this.bar,
      this.progressText,
      this.message,
      chartHost,
      el('h3', {}, ['Estimates in the grid']),
      el('label', { className: 'rf-check' }, [overlayToggle, ' Show estimates in blank cells']),
      el('label', { className: 'rf-check' }, [liveToggle, ' Refit after each edit']),
      el('div', { className: 'rf-legend', testid: 'overlay-legend' }, [
        el('span', { className: 'rf-legend-observed' }, ['5']),
        ' observed rating  ',
        el('span', { className: 'rf-legend-estimate rf-legend-sure' }, ['4.6']),
        el('span', { className: 'rf-legend-estimate rf-legend-unsure' }, ['4.6']),
        ' estimate: pale = narrow interval (the true rating is likely close), deep = wide interval (it could be far off)',
      ]),
      field(
        'Interval level (%)',
        levelInput,
        'Each estimate gets a range meant to hold the true rating in this share of cells like the ones hidden during cross-validation (50–99 %). It holds on average over cells, not for each cell.',
      ),
      el('p', { className: 'rf-caution', testid: 'estimate-caution' }, [
        'Filled values are model estimates, not measurements. Where rows or columns are people being judged, an estimate is not that person’s score.',
      ]),
    );
    this.chart = new ObjectiveChart(chartHost);
    hooks.controller.onFillState((s) => this.render(s));
    hooks.settings.subscribe(() => this.renderSettings());
    this.renderSettings();
  }

  /** Inputs write to the settings store: typing updates it, leaving a field shows the value it kept. */
  private wireInputs(): void {
    const st = this.hooks.settings;
    const num = (input: HTMLInputElement, key: keyof SettingsPatch) => {
      const write = () => {
        if (input.value.trim() === '' || !Number.isFinite(Number(input.value))) return;
        st.update({ [key]: Number(input.value) } as SettingsPatch);
      };
      input.addEventListener('input', write);
      input.addEventListener('change', () => {
        write();
        this.renderSettings(true);
      });
    };
    num(this.rank, 'rank');
    num(this.lambda, 'lambda');
    num(this.iterations, 'maxIterations');
    num(this.seed, 'seed');
    num(this.shrinkage, 'shrinkage');
    this.family.addEventListener('change', () => st.setFamily(this.family.value as ModelFamily));
    this.centering.addEventListener('change', () => st.update({ centering: this.centering.value as Centering }));
    this.clip.addEventListener('change', () => st.update({ clipToScale: this.clip.checked }));
    this.transpose.addEventListener('change', () => st.update({ transpose: this.transpose.checked }));
  }

  /** Show what the store holds; a field being typed in keeps its text unless `all`. */
  private renderSettings(all = false): void {
    const { family, lowRank, gaussian } = this.hooks.settings.state;
    const put = (input: HTMLInputElement, v: number) => {
      if (!all && input === document.activeElement && Number(input.value) === v) return;
      if (input.value !== String(v)) input.value = String(v);
    };
    this.family.value = family;
    put(this.rank, lowRank.rank);
    put(this.lambda, lowRank.lambda);
    this.centering.value = lowRank.centering;
    put(this.shrinkage, gaussian.shrinkage);
    this.transpose.checked = gaussian.transpose;
    const shared = family === 'gaussian' ? gaussian : lowRank;
    put(this.iterations, shared.maxIterations);
    put(this.seed, shared.seed);
    this.clip.checked = shared.clipToScale;
    const g = family === 'gaussian';
    const reason = this.hooks.settings.reason;
    this.choiceNote.hidden = g || reason === '';
    this.choiceNote.textContent = reason ? `Chosen from the data — ${reason}. Change any setting to use your own.` : '';
    this.lowRankBox.hidden = g;
    this.gaussianBox.hidden = !g;
    this.familyNote.textContent = g
      ? 'Suits tall, narrow sets (many respondents, a few dozen items): fills each blank from the row’s other answers and the items’ correlations.'
      : 'Suits most rating sets: a baseline plus a few hidden traits shared by rows and columns.';
  }

  private render(s: FillState): void {
    const running = s.phase === 'running';
    this.fillButton.disabled = running;
    this.stopButton.disabled = !running;
    this.message.hidden = s.phase !== 'failed';
    if (s.phase === 'failed') {
      this.message.textContent = `The fit stopped: ${s.message}`;
      this.progressText.textContent = 'No new run.';
    } else if (s.phase === 'cancelled') {
      this.progressText.textContent = 'Stopped; the previous estimates stay shown.';
      this.bar.value = 0;
    } else if (s.phase === 'running') {
      const last = s.progress[s.progress.length - 1];
      const max = s.settings.maxIterations;
      this.bar.max = max;
      this.bar.value = last ? Math.min(max, last.iteration) : 0;
      this.progressText.textContent = last
        ? `Iteration ${last.iteration} of at most ${max} · objective ${last.objective === null ? '—' : last.objective.toPrecision(6)} · ${Math.round(last.elapsedMs)} ms`
        : 'Starting…';
      this.chart.set(
        s.progress.map((p) => p.iteration),
        s.progress.map((p) => p.objective ?? NaN),
      );
    } else {
      this.bar.value = this.bar.max;
    }
  }

  /** The settings are being chosen from the data before a first Fill (null: that step ended). */
  showChoosing(state: { done: number; total: number } | null, cancel: () => void): void {
    this.cancelChoosing = state ? cancel : null;
    this.fillButton.disabled = state !== null;
    this.stopButton.disabled = state === null;
    if (!state) return;
    this.message.hidden = true;
    this.bar.max = Math.max(1, state.total);
    this.bar.value = state.done;
    this.progressText.textContent = `Choosing settings from the data: ${state.done} of ${state.total} fold fits (3-fold cross-validation, rank 0 among the candidates)…`;
  }

  /** Choosing the settings failed; nothing was filled. */
  showChoiceFailed(message: string): void {
    this.message.hidden = false;
    this.message.textContent = `Could not choose settings from the data: ${message}`;
    this.progressText.textContent = 'No new run.';
  }

  /** No run to show (another data set was opened): no status or chart of the old one stays. */
  showNoRun(): void {
    this.chart.set([], []);
    this.bar.max = 1;
    this.bar.value = 0;
    this.message.hidden = true;
    this.progressText.textContent = 'No fit yet.';
  }

  /** Show a finished run's trace and summary. */
  showRunTrace(trace: number[], summary: string): void {
    this.chart.set(
      trace.map((_, i) => i + 1),
      trace,
    );
    this.progressText.textContent = summary;
  }
}
