/**
 * Tab-separated blocks as spreadsheets put them on the clipboard: rows end with
 * \n or \r\n (a final line break is not an extra row), cells are split on tabs,
 * and a cell wrapped in double quotes may hold tabs, line breaks and "" for a quote.
 */

export function parseTabBlock(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let i = 0;
  const n = text.length;
  let atCellStart = true;
  while (i < n) {
    const ch = text[i];
    if (atCellStart && ch === '"') {
      // Quoted cell: read to the closing quote.
      let j = i + 1;
      let buf = '';
      let closed = false;
      while (j < n) {
        if (text[j] === '"') {
          if (text[j + 1] === '"') {
            buf += '"';
            j += 2;
            continue;
          }
          closed = true;
          j++;
          break;
        }
        buf += text[j++];
      }
      if (closed && (j >= n || text[j] === '\t' || text[j] === '\n' || text[j] === '\r')) {
        cell = buf;
        i = j;
        atCellStart = false;
        continue;
      }
      // Not a well-formed quoted cell: take the quote literally.
    }
    atCellStart = false;
    if (ch === '\t') {
      row.push(cell);
      cell = '';
      atCellStart = true;
      i++;
    } else if (ch === '\n' || ch === '\r') {
      row.push(cell);
      rows.push(row);
      row = [];
      cell = '';
      atCellStart = true;
      i += ch === '\r' && text[i + 1] === '\n' ? 2 : 1;
    } else {
      cell += ch;
      i++;
    }
  }
  if (!atCellStart || cell !== '' || row.length > 0) {
    row.push(cell);
    rows.push(row);
  }
  return rows;
}

function quoteCell(s: string): string {
  return /["\t\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Rows of cell texts as tab-separated lines (quoted where needed), ending with a line break. */
export function formatTabBlock(rows: readonly (readonly string[])[]): string {
  return rows.map((r) => r.map(quoteCell).join('\t')).join('\n') + (rows.length ? '\n' : '');
}
