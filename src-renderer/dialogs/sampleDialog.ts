/** "Open a sample set": the invented demo data sets, one button each (the menu's File ▸ Open a Sample Set…). */
import { showModal } from './modal';
import { el } from '../panels/dom';

export interface SampleChoice {
  id: string;
  title: string;
  description: string;
}

/** Resolves with the chosen sample's id, or null. */
export function sampleDialog(samples: readonly SampleChoice[], openId: string): Promise<string | null> {
  const body = el('div', {}, [el('p', { text: 'Invented demo data sets, each with blank cells to fill:' })]);
  const list = el('dl', { className: 'rf-facts rf-sample-facts' });
  for (const s of samples)
    list.append(
      el('dt', { text: s.title + (s.id === openId ? ' (open now)' : '') }),
      el('dd', { text: s.description }),
    );
  body.append(list);
  return showModal<string | null>({
    title: 'Open a sample set',
    body,
    testId: 'sample-dialog',
    cancelValue: null,
    buttons: [
      { label: 'Cancel', value: null, testId: 'dialog-cancel' },
      ...samples.map((s, i) => ({ label: s.title, value: s.id, primary: i === 0, testId: `sample-open-${s.id}` })),
    ],
  });
}
