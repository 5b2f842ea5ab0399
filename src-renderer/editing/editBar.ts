/**
 * The edit bar under the title bar: undo/redo (showing what they will take
 * back or bring back), the rows-and-columns menu, transposition, the scale
 * (shown and editable), and the project buttons with the recent-files menu.
 */
import { el } from '../panels/dom';
import { describeScale } from '../grid/cellText';
import type { HostBridge } from '../bridge/hostBridge';
import type { DocumentStore } from '../state/documentStore';
import type { CommandId } from '../../src-shared/commands';

function button(label: string, testId: string, onClick: () => void, title = ''): HTMLButtonElement {
  const b = el('button', {
    className: 'rf-button rf-edit-button',
    testid: testId,
    text: label,
    title: title,
    attrs: { type: 'button' },
  });
  b.addEventListener('click', onClick);
  return b;
}

/** A small drop-down menu built on <details>; closes after a choice. */
function menu(
  label: string,
  testId: string,
  items: ([string, string, () => void] | 'sep')[],
  onOpen?: (list: HTMLElement) => void,
): HTMLDetailsElement {
  const list = el('div', { className: 'rf-menu-list', attrs: { role: 'menu' } });
  const details = el('details', { className: 'rf-menu', testid: testId }, [
    el('summary', { className: 'rf-button rf-edit-button', text: label }),
    list,
  ]);
  const fill = () => {
    list.replaceChildren();
    for (const it of items) {
      if (it === 'sep') {
        list.append(el('hr'));
        continue;
      }
      const [text, id, run] = it;
      const b = el('button', { testid: id, text: text, attrs: { type: 'button', role: 'menuitem' } });
      b.addEventListener('click', () => {
        details.open = false;
        run();
      });
      list.append(b);
    }
    onOpen?.(list);
  };
  fill();
  details.addEventListener('toggle', () => {
    if (details.open) fill();
  });
  document.addEventListener('click', (e) => {
    if (details.open && !details.contains(e.target as Node)) details.open = false;
  });
  return details;
}

export function mountEditBar(
  root: HTMLElement,
  deps: { store: DocumentStore; bridge: HostBridge; run: (id: CommandId, index?: number) => void },
): void {
  const { store, bridge, run } = deps;
  const cmd = (id: CommandId) => () => run(id);
  const undo = button('Undo', 'undo-button', cmd('edit.undo'));
  const redo = button('Redo', 'redo-button', cmd('edit.redo'));
  const scale = button('', 'scale-button', cmd('edit.scale'), 'Change the rating scale (minimum, maximum, step)');
  const rowsCols = menu('Rows & columns ▾', 'rows-cols-menu', [
    ['Add row below', 'cmd-add-row', cmd('edit.addRow')],
    ['Add column to the right', 'cmd-add-column', cmd('edit.addColumn')],
    ['Rename row…', 'cmd-rename-row', cmd('edit.renameRow')],
    ['Rename column…', 'cmd-rename-column', cmd('edit.renameColumn')],
    ['Delete selected rows…', 'cmd-delete-rows', cmd('edit.deleteRows')],
    ['Delete selected columns…', 'cmd-delete-columns', cmd('edit.deleteColumns')],
    'sep',
    ['Move row up', 'cmd-row-up', cmd('edit.moveRowUp')],
    ['Move row down', 'cmd-row-down', cmd('edit.moveRowDown')],
    ['Move column left', 'cmd-col-left', cmd('edit.moveColumnLeft')],
    ['Move column right', 'cmd-col-right', cmd('edit.moveColumnRight')],
    'sep',
    ['Sort rows by label, A → Z', 'cmd-sort-label-asc', cmd('edit.sortByLabelAsc')],
    ['Sort rows by label, Z → A', 'cmd-sort-label-desc', cmd('edit.sortByLabelDesc')],
    ['Sort rows by this column, low → high', 'cmd-sort-col-asc', cmd('edit.sortByColumnAsc')],
    ['Sort rows by this column, high → low', 'cmd-sort-col-desc', cmd('edit.sortByColumnDesc')],
  ]);
  const swap = button(
    'Swap rows ⇄ columns',
    'transpose-button',
    cmd('edit.transpose'),
    'Rows become columns and columns become rows (one undoable change)',
  );

  const recentItems: [string, string, () => void][] = [];
  const recent = menu('Recent ▾', 'recent-menu', [], (list) => {
    list.replaceChildren(el('span', { className: 'rf-hint', text: 'Loading…' }));
    void bridge
      .call('recent.list', {})
      .then(({ files: rf }) => {
        list.replaceChildren();
        recentItems.length = 0;
        if (rf.length === 0) list.append(el('span', { className: 'rf-hint', text: 'No recent projects yet' }));
        rf.forEach((f, i) => {
          const b = el('button', {
            testid: `recent-${i}`,
            text: f.path,
            title: `last opened ${new Date(f.openedAt).toLocaleString('en-GB')}`,
            attrs: { type: 'button', role: 'menuitem' },
          });
          b.addEventListener('click', () => {
            (list.parentElement as HTMLDetailsElement).open = false;
            run('file.openRecent', i);
          });
          list.append(b);
        });
      })
      .catch(() => list.replaceChildren(el('span', { className: 'rf-hint', text: 'Recent files are not available' })));
  });

  root.replaceChildren(
    el('div', { className: 'rf-edit-group' }, [undo, redo]),
    el('div', { className: 'rf-edit-group' }, [rowsCols, swap, scale]),
    el('div', { className: 'rf-edit-spacer' }),
    el('div', { className: 'rf-edit-group' }, [
      button(
        'Open project…',
        'open-project-button',
        cmd('file.openProject'),
        'Open a .rankfill project file (Ctrl+Shift+O)',
      ),
      recent,
      button('Keep', 'save-button', cmd('file.save'), 'Keep the project in its file (Ctrl+S)'),
      button('Keep as…', 'save-as-button', cmd('file.saveAs'), 'Keep the project in a new file (Ctrl+Shift+S)'),
    ]),
  );

  const refresh = () => {
    const u = store.undoLabel();
    const r = store.redoLabel();
    undo.disabled = !u;
    redo.disabled = !r;
    undo.textContent = u ? `↶ Undo: ${u}` : '↶ Undo';
    redo.textContent = r ? `↷ Redo: ${r}` : '↷ Redo';
    undo.title = u ? `Take back “${u}” (Ctrl+Z)` : 'Nothing to take back';
    redo.title = r ? `Bring back “${r}” (Ctrl+Shift+Z or Ctrl+Y)` : 'Nothing to bring back';
    scale.textContent = `Scale ${describeScale(store.current.scale)}`;
  };
  store.subscribe(refresh);
  refresh();
}
