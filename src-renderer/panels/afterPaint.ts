/**
 * Runs secondary view updates (charts, lists, details) after the next frame is
 * painted, once per frame however often they were asked for, so that the grid's
 * overlay reaches the screen first after an edit.
 */
const pending = new Map<string, () => void>();
let scheduled = false;

export function afterPaint(key: string, fn: () => void): void {
  pending.set(key, fn);
  if (scheduled) return;
  scheduled = true;
  requestAnimationFrame(() =>
    setTimeout(() => {
      scheduled = false;
      const jobs = [...pending.values()];
      pending.clear();
      for (const job of jobs) job();
    }, 0),
  );
}
