/**
 * Plain-text tables for terminal reports: left-aligned first column,
 * right-aligned value columns, two spaces between.
 */

/** Lays out rows with aligned columns: the first left-aligned, the others right-aligned unless `leftAligned`. */
export function table(rows: ReadonlyArray<readonly string[]>, indent = '  ', leftAligned = false): string {
  const widths: number[] = [];
  for (const row of rows) row.forEach((cell, i) => (widths[i] = Math.max(widths[i] ?? 0, [...cell].length)));
  return rows
    .map((row) =>
      indent +
      row
        .map((cell, i) => {
          const pad = (widths[i] ?? 0) - [...cell].length;
          return i === 0 || leftAligned ? cell + ' '.repeat(pad) : ' '.repeat(pad) + cell;
        })
        .join('  ')
        .trimEnd(),
    )
    .join('\n');
}

/** A section heading: the title and a rule under it. */
export function heading(title: string): string {
  return `${title}\n${'─'.repeat([...title].length)}`;
}
