/** Plain-text tables for the terminal: padded columns, a rule under the header, ASCII only. */

export interface TextColumn {
  title: string;
  align?: 'left' | 'right';
}

export interface TextTable {
  columns: readonly TextColumn[];
  rows: readonly (readonly string[])[];
}

/** Shown for a value that does not exist (null), e.g. the THD of a take without a tone. */
export const MISSING_VALUE = 'n/a';

/** Fixed-decimal number with an optional unit; `MISSING_VALUE` for null or non-finite values. */
export function formatValue(value: number | null, decimals: number, unit = ''): string {
  if (value === null || !Number.isFinite(value)) return MISSING_VALUE;
  const text = value.toFixed(decimals);
  return unit ? `${text} ${unit}` : text;
}

/** A number to `digits` significant digits with an optional unit; `MISSING_VALUE` for null or non-finite values. */
export function formatSignificant(value: number | null, digits: number, unit = ''): string {
  if (value === null || !Number.isFinite(value)) return MISSING_VALUE;
  const text = value.toPrecision(digits);
  return unit ? `${text} ${unit}` : text;
}

export function formatTable(table: TextTable): string {
  const widths = table.columns.map((column, i) =>
    Math.max(column.title.length, ...table.rows.map((row) => (row[i] ?? '').length)),
  );
  const pad = (text: string, i: number): string =>
    table.columns[i].align === 'right' ? text.padStart(widths[i]) : text.padEnd(widths[i]);
  const line = (cells: readonly string[]): string =>
    table.columns.map((_, i) => pad(cells[i] ?? '', i)).join('  ').trimEnd();
  const header = line(table.columns.map((c) => c.title));
  const rule = widths.map((w) => '-'.repeat(w)).join('  ');
  return [header, rule, ...table.rows.map(line)].join('\n') + '\n';
}

/** A cell that reads as a number (or the missing-value mark) is right-aligned by `formatRows`. */
const NUMERIC_CELL = /^([-+]?(\d|\.\d)|n\/a$)/;

/**
 * Table from header titles and rows of cells; columns whose cells all read as numbers are
 * right-aligned, the others left-aligned.
 */
export function formatRows(headers: readonly string[], rows: readonly (readonly string[])[]): string {
  const columns = headers.map((title, i) => {
    const cells = rows.map((row) => row[i] ?? '').filter((cell) => cell !== '');
    const numeric = cells.length > 0 && cells.every((cell) => NUMERIC_CELL.test(cell));
    return { title, align: numeric ? ('right' as const) : ('left' as const) };
  });
  return formatTable({ columns, rows });
}
