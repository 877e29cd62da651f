/**
 * Self-contained HTML reports: inline CSS and inline SVG, no scripts, no network, no external
 * fonts, so a report opens from disk anywhere. Every string that may come from the user (file
 * names, design names, labels) goes through `escapeHtml`.
 */

/** Escapes the five characters with meaning in HTML text and attribute values. */
export function escapeHtml(text: string): string {
  return text
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

export interface HtmlTable {
  columns: readonly string[];
  rows: readonly (readonly string[])[];
  /** Columns (by index) to right-align, e.g. numbers. */
  numericColumns?: readonly number[];
}

export interface HtmlFigure {
  /** SVG markup from `report/plots.ts` (rendered by vega, which escapes its text). */
  svg: string;
  caption?: string;
}

export interface HtmlSection {
  heading: string;
  paragraphs?: readonly string[];
  tables?: readonly HtmlTable[];
  figures?: readonly HtmlFigure[];
}

export interface HtmlReport {
  title: string;
  subtitle?: string;
  sections: readonly HtmlSection[];
  /** Footer line, e.g. the program and version that wrote the report. */
  footer?: string;
}

const STYLE = `
body { font-family: Helvetica, Arial, sans-serif; margin: 2em auto; max-width: 60em; padding: 0 1em; color: #222; background: #fff; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; }
h2 { font-size: 1.15em; border-bottom: 1px solid #ccc; padding-bottom: 0.2em; margin-top: 2em; }
.subtitle { color: #555; margin-top: 0; }
table { border-collapse: collapse; margin: 0.8em 0; }
th, td { padding: 0.25em 0.8em; border-bottom: 1px solid #e3e3e3; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
th { background: #f4f4f4; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { color: #555; font-size: 0.9em; }
footer { margin-top: 3em; color: #777; font-size: 0.85em; }
`;

function assertPlainSvg(svg: string): void {
  if (!/^\s*<svg[\s>/]/.test(svg) || /<script|<foreignObject|<[^>]*\son\w+\s*=\s*["']/i.test(svg)) {
    throw new Error('html report: figure is not plain SVG markup from the plot renderer');
  }
}

function renderTable(table: HtmlTable): string {
  const numeric = new Set(table.numericColumns ?? []);
  const head = table.columns.map((c) => `<th>${escapeHtml(c)}</th>`).join('');
  const body = table.rows
    .map((row) => `<tr>${row.map((cell, i) => `<td${numeric.has(i) ? ' class="num"' : ''}>${escapeHtml(cell)}</td>`).join('')}</tr>`)
    .join('\n');
  return `<table>\n<thead><tr>${head}</tr></thead>\n<tbody>\n${body}\n</tbody>\n</table>`;
}

function renderFigure(figure: HtmlFigure): string {
  assertPlainSvg(figure.svg);
  const caption = figure.caption ? `<figcaption>${escapeHtml(figure.caption)}</figcaption>` : '';
  return `<figure>\n${figure.svg}\n${caption}</figure>`;
}

function renderSection(section: HtmlSection): string {
  const parts = [`<h2>${escapeHtml(section.heading)}</h2>`];
  for (const paragraph of section.paragraphs ?? []) parts.push(`<p>${escapeHtml(paragraph)}</p>`);
  for (const table of section.tables ?? []) parts.push(renderTable(table));
  for (const figure of section.figures ?? []) parts.push(renderFigure(figure));
  return `<section>\n${parts.join('\n')}\n</section>`;
}

export function buildHtmlReport(report: HtmlReport): string {
  const subtitle = report.subtitle ? `<p class="subtitle">${escapeHtml(report.subtitle)}</p>\n` : '';
  const footer = report.footer ? `<footer>${escapeHtml(report.footer)}</footer>\n` : '';
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(report.title)}</title>
<style>${STYLE}</style>
</head>
<body>
<h1>${escapeHtml(report.title)}</h1>
${subtitle}${report.sections.map(renderSection).join('\n')}
${footer}</body>
</html>
`;
}
