/**
 * Gives each body cell of a data table its column heading as `data-label`, so a phone can show every row as a
 * small card ("Drawn  2026-03-02") without each page repeating its headings per cell.
 */
export function headingsOf(table: HTMLTableElement): string[] {
  const row = table.tHead?.rows[table.tHead.rows.length - 1];
  if (!row) return [];
  const out: string[] = [];
  for (const cell of Array.from(row.cells)) {
    const text = (cell.textContent ?? '')
      .replace(/[▲▼↑↓]/g, '')
      .replace(/\s+/g, ' ')
      .trim();
    for (let i = 0; i < cell.colSpan; i++) out.push(text);
  }
  return out;
}

/** Labels every `.data-table` under root; cells that already carry a label, or span columns, are left alone. */
export function labelTableCells(root: ParentNode): void {
  for (const table of Array.from(root.querySelectorAll<HTMLTableElement>('table.data-table'))) {
    const headings = headingsOf(table);
    if (headings.length === 0) continue;
    for (const body of Array.from(table.tBodies))
      for (const row of Array.from(body.rows)) {
        let col = 0;
        for (const cell of Array.from(row.cells)) {
          const heading = headings[col];
          if (cell.colSpan === 1 && heading && !cell.hasAttribute('data-label'))
            cell.setAttribute('data-label', heading);
          col += cell.colSpan;
        }
      }
  }
}
