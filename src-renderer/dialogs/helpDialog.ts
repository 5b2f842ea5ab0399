/**
 * Rankfill's own help page (F1, Help ▸ How Rankfill Fills Cells): the workflow
 * and the model in plain words. Kept short; README.md has the full account.
 */
import { showModal } from './modal';
import { el } from '../panels/dom';

const SECTIONS: [string, string[]][] = [
  [
    'The workflow',
    [
      'Open a sample set, bring in your own CSV, TSV or semicolon-separated file, or open a kept project. The grid shows only the ratings you have; blank cells are the ones nobody rated.',
      'Type a number into a cell to set it, Delete to clear it. Undo and Redo take back and bring back every change. Rows & columns adds, renames, moves, sorts and deletes; Swap turns rows into columns.',
      'In the Model tab, choose the settings and press Fill blank cells (Ctrl+Enter). The fit runs in the background; Stop ends it. Estimates then appear in the blank cells.',
      'The Runs tab keeps every Fill. Evaluate scores a run by cross-validation; Compare shows how far two runs disagree, cell by cell. The Centering and Tuning tabs search for the settings that predict held-out ratings best.',
      'Keep saves the project (data, settings and runs). Write out… exports the filled matrix to CSV, with a settings file that records how it was made.',
    ],
  ],
  [
    'How a blank cell is filled',
    [
      'Each estimate is a baseline plus an interaction term. The baseline is what the centering takes out: each row’s mean, each column’s mean, both (a global mean plus row and column offsets), or nothing.',
      'The interaction term comes from a few hidden traits (the rank). Every row and every column gets a score on each trait, fitted to the observed ratings; a row that scores high on a trait where a column also scores high is pushed up there. Rank 0 uses the baseline alone.',
      'Regularization (λ) pulls the trait scores toward zero, so rows and columns with few ratings lean on the baseline instead of on noise.',
      'For tall, narrow sets (many respondents, a few dozen items) the Gaussian family fills each blank from the row’s other answers and the items’ correlations.',
    ],
  ],
  [
    'How far to trust an estimate',
    [
      'Estimates are drawn in italics, marked with a corner notch and tinted; the stronger the tint, the more the model disagrees with itself when parts of the data are held out (the spread). A row or column with fewer ratings than the rank is marked ◌: its estimates rest mostly on the baseline.',
      'An estimate is a model’s guess, never a measurement. Where rows or columns are people being judged, do not treat an estimate as that person’s score.',
    ],
  ],
  [
    'Keys',
    [
      'Tab and Shift+Tab move between controls and in and out of the grid; arrow keys move inside the grid and between the side tabs. Ctrl+B hides or shows the side panel, Ctrl+H the estimates, F1 this page.',
    ],
  ],
];

export function helpDialog(): Promise<void> {
  const body = el('div', { className: 'rf-help', testid: 'help-page' });
  for (const [title, paras] of SECTIONS) {
    body.append(el('h3', { text: title }), ...paras.map((p) => el('p', { text: p })));
  }
  return showModal<void>({
    title: 'How Rankfill fills cells',
    body,
    wide: true,
    testId: 'help-dialog',
    cancelValue: undefined,
    buttons: [{ label: 'Close', value: undefined, primary: true, testId: 'dialog-cancel' }],
  });
}
