/** Terminal table, JSON and HTML of a tolerance `spread`. */
import { SPREAD_OCTAVES_HZ, type SpreadReport } from '../analysis/spread.js';
import { buildHtmlReport, type HtmlSection } from './html.js';
import { FREQUENCY_AXIS, renderLinePlotSvg, renderStemPlotSvg } from './plots.js';
import { formatRows, formatSignificant } from './table.js';
import { writeHtmlReport, writeJsonReport, type NamedSvg } from './writeReports.js';

/** Histogram bins per figure. */
const HISTOGRAM_BINS = 20;

function figureRows(report: SpreadReport): string[][] {
  return Object.entries(report.figures).map(([name, stats]) => [
    name,
    formatSignificant(report.nominal[name] ?? null, 4),
    formatSignificant(stats.p05, 4),
    formatSignificant(stats.p50, 4),
    formatSignificant(stats.p95, 4),
    formatSignificant(stats.std, 3),
  ]);
}

function sensitivityText(report: SpreadReport, figure: string): string {
  const entries = report.sensitivity.filter((s) => s.figure === figure);
  return entries.length === 0 ? 'n/a' : entries.map((s) => `${s.part} ${(s.share * 100).toFixed(0)} %`).join(', ');
}

export function formatSpreadSummary(report: SpreadReport): string {
  const held = report.tolerances.parts.filter((p) => p.tolerance === 'held').map((p) => p.part);
  const lines = [
    `${report.design}: ${report.runs} builds (seed ${report.seed}, oversampling ${report.oversample}x), parts drawn within their tolerances`,
    formatRows(['figure', 'nominal', 'p05', 'p50', 'p95', 'std'], figureRows(report)).trimEnd(),
    '',
    'Parts that move each figure most (share of its variance):',
    ...Object.keys(report.figures).map((figure) => `  ${figure}: ${sensitivityText(report, figure)}`),
  ];
  if (held.length > 0) lines.push('', `Held at typical (no datasheet range in the parts library, or tolerance 0): ${held.join(', ')}`);
  if (report.failedBuilds.length > 0) {
    lines.push('', `${report.failedBuilds.length} of ${report.runs} builds could not be measured and are left out, e.g.: ${report.failedBuilds[0].message}`);
  }
  return `${lines.join('\n')}\n`;
}

export async function writeSpreadJson(path: string, report: SpreadReport): Promise<void> {
  await writeJsonReport(path, report);
}

async function histogram(name: string, report: SpreadReport): Promise<NamedSvg | null> {
  const values = report.builds.map((b) => b.figures[name]).filter((v): v is number => v !== null && v !== undefined && Number.isFinite(v));
  if (values.length === 0) return null;
  const low = Math.min(...values);
  const high = Math.max(...values);
  const width = high > low ? (high - low) / HISTOGRAM_BINS : 1;
  const counts = new Array<number>(HISTOGRAM_BINS).fill(0);
  for (const v of values) counts[Math.min(HISTOGRAM_BINS - 1, Math.floor((v - low) / width))]++;
  return {
    name: `histogram-${name.replace(/[^A-Za-z0-9.]+/g, '_')}`,
    svg: await renderStemPlotSvg({
      title: `${name} over ${values.length} builds`,
      xLabel: name,
      yLabel: 'builds',
      baseline: 0,
      stems: counts.map((count, i) => ({ x: low + (i + 0.5) * width, y: count })),
    }),
  };
}

export async function writeSpreadHtml(path: string, report: SpreadReport): Promise<void> {
  const band = (key: 'p05' | 'p50' | 'p95') => SPREAD_OCTAVES_HZ.flatMap((hz) => {
    const value = report.figures[`responseDb@${hz}Hz`]?.[key];
    return value === null || value === undefined ? [] : [{ x: hz, y: value }];
  });
  const responseBand: NamedSvg = {
    name: 'response-band',
    svg: await renderLinePlotSvg({
      title: 'Small-signal response over the builds (5th, 50th, 95th percentile)',
      xLabel: FREQUENCY_AXIS,
      yLabel: 'gain (dB)',
      xScale: 'log',
      series: [
        { name: 'p95', points: band('p95') },
        { name: 'p50', points: band('p50') },
        { name: 'p05', points: band('p05') },
      ],
    }),
  };
  const histograms = (await Promise.all(Object.keys(report.figures).map((name) => histogram(name, report)))).filter((h): h is NamedSvg => h !== null);
  const sections: HtmlSection[] = [
    {
      heading: 'Figures',
      paragraphs: [`${report.runs} builds, seed ${report.seed}: each part drawn within its tolerance (Gaussian, sigma a third of the tolerance, clipped at it; semiconductors within their datasheet ranges).`],
      tables: [{ columns: ['figure', 'nominal', 'p05', 'p50', 'p95', 'std'], rows: figureRows(report), numericColumns: [1, 2, 3, 4, 5] }],
    },
    {
      heading: 'Which parts matter',
      tables: [{ columns: ['figure', 'part', 'share of its variance'], rows: report.sensitivity.map((s) => [s.figure, s.part, `${(s.share * 100).toFixed(1)} %`]), numericColumns: [2] }],
    },
    { heading: 'Response band', figures: [{ svg: responseBand.svg }] },
    { heading: 'Histograms', figures: histograms.map((h) => ({ svg: h.svg })) },
  ];
  const html = buildHtmlReport({ title: `clipbench spread: ${report.design}`, subtitle: `${report.runs} builds, seed ${report.seed}`, sections, footer: 'Written by clipbench spread.' });
  await writeHtmlReport(path, html, [responseBand, ...histograms]);
}
