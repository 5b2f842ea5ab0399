/**
 * Editing the rating scale (minimum, maximum, step). Values outside the new
 * scale are listed and must be confirmed; they are then cleared together with
 * the scale change as one undoable change (see editing/scaleChange.ts).
 */
import type { RatingMatrix, RatingScale } from '../../src-shared/matrix/ratingMatrix';
import { describeScale } from '../grid/cellText';
import { scaleProblem, valuesOutside } from '../editing/scaleChange';
import { confirmDialog, listBlock, showModal } from './modal';
import { el } from '../panels/dom';

function numberField(name: string, label: string, value: number): HTMLElement {
  const input = el('input', { testid: `scale-${name}`, attrs: { type: 'text', inputmode: 'decimal', name: name } });
  input.value = String(value);
  return el('label', { className: 'rf-dialog-field' }, [el('span', { text: label }), input]);
}

const readNumber = (s: string) => (s.trim() === '' ? NaN : Number(s.trim().replace(',', '.')));

/** Ask for a new scale; resolves with it (after confirming any values it would clear) or null. */
export async function scaleDialog(m: RatingMatrix): Promise<RatingScale | null> {
  const form = el('div', { className: 'rf-scale-form' }, [
    numberField('min', 'Lowest rating', m.scale.min),
    numberField('max', 'Highest rating', m.scale.max),
    numberField('step', 'Step (0 = any value)', m.scale.step),
    el('p', {
      className: 'rf-hint',
      text: `Now: ${describeScale(m.scale)}. Examples: 1–5 step 1, 0.5–5 step 0.5, 0–10 step 0.1.`,
    }),
  ]);
  const read = (): RatingScale => {
    const v = (n: string) => readNumber((form.querySelector(`[name="${n}"]`) as HTMLInputElement).value);
    return { min: v('min'), max: v('max'), step: v('step') };
  };
  const ok = await showModal<boolean>({
    title: 'Rating scale',
    body: form,
    testId: 'scale-dialog',
    cancelValue: false,
    validate: () => scaleProblem(read()),
    buttons: [
      { label: 'Cancel', value: false, testId: 'dialog-cancel' },
      { label: 'Use this scale', value: true, primary: true, testId: 'dialog-confirm' },
    ],
  });
  if (!ok) return null;
  const next = read();
  const outside = valuesOutside(m, next);
  if (outside.length === 0) return next;
  const lines = outside.slice(0, 30).map((o) => `${m.rowLabels[o.row]} × ${m.colLabels[o.col]}: ${o.value}`);
  if (outside.length > 30) lines.push(`and ${outside.length - 30} more`);
  const body = el('div', {}, [
    el('p', {
      text: `${outside.length} observed value${outside.length === 1 ? ' lies' : 's lie'} outside ${describeScale(next)}:`,
    }),
    listBlock(lines, 'scale-outside'),
    el('p', { text: 'Changing the scale makes these cells blank. You can take this back with Undo.' }),
  ]);
  const confirmed = await confirmDialog(
    'Values outside the new scale',
    body,
    `Clear ${outside.length} and change the scale`,
    'Keep the old scale',
    'scale-confirm-dialog',
    { destructive: true },
  );
  return confirmed ? next : null;
}
