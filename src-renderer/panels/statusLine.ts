/** The status line: shape, observed count, percent missing, scale, host. */
import { summarize, type RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import { describeScale } from '../grid/cellText';

export function renderStatusLine(root: HTMLElement, m: RatingMatrix, hostLine: string): void {
  const s = summarize(m);
  const set = (id: string, text: string) => {
    const el = root.querySelector<HTMLElement>(`[data-testid="${id}"]`);
    if (el) el.textContent = text;
  };
  set('status-shape', `${s.rows} rows × ${s.cols} columns`);
  set('status-observed', `${s.observed.toLocaleString('en')} observed`);
  set('status-missing', `${s.percentMissing.toFixed(1)} % missing (${s.missing.toLocaleString('en')} blank)`);
  set('status-scale', `scale ${describeScale(m.scale)}`);
  set('status-host', hostLine);
}
