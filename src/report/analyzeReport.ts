/** Terminal summary, JSON and HTML output of `analyze`. */
import { assertNotAnInput } from '../audio/atomicWrite.js';
import type { AnalyzeReport } from '../analysis/analyzeTake.js';
import { buildHtmlReport, type HtmlSection } from './html.js';
import { renderLinePlotSvg, renderStemPlotSvg, FREQUENCY_AXIS, SPECTRUM_LEVEL_AXIS } from './plots.js';
import { formatRows, formatValue } from './table.js';
import { svgPathBeside, writeHtmlReport, writeJsonReport, type NamedSvg } from './writeReports.js';

/** Rows shown in the terminal and the HTML table. */
const HARMONIC_ROWS = 10;
/** Dynamic range shown by the plots, dB below their top. */
const SPECTRUM_RANGE_DB = 140;
const HARMONIC_FLOOR_DBC = -140;

function levelRows(report: AnalyzeReport): string[][] {
  return [
    ['sample peak', formatValue(report.peakDbfs, 2, 'dBFS')],
    ['true peak (4x)', formatValue(report.truePeakDbfs, 2, 'dBTP')],
    ['RMS', formatValue(report.rmsDbfs, 2, 'dBFS')],
    ['crest factor', formatValue(report.crestDb, 2, 'dB')],
    ['integrated loudness (BS.1770-4)', formatValue(report.lufs, 1, 'LUFS')],
  ];
}

function toneRows(report: AnalyzeReport): string[][] {
  return [
    ['fundamental', formatValue(report.fundamentalHz, 2, 'Hz')],
    ['THD', formatValue(report.thdPercent, 4, '%')],
    ['THD+N (20 Hz-20 kHz)', formatValue(report.thdnPercent, 4, '%')],
  ];
}

function harmonicRows(report: AnalyzeReport): string[][] {
  return report.harmonics.slice(0, HARMONIC_ROWS).map((h) => [String(h.order), h.hz.toFixed(1), h.dbc.toFixed(1)]);
}

function describeTake(report: AnalyzeReport): string {
  const layout = report.channels === 1 ? 'mono' : `${report.channels} channels`;
  return `${report.file}: ${report.sampleRate} Hz, ${layout}, ${report.durationSeconds.toFixed(2)} s`;
}

function describeTone(report: AnalyzeReport): string {
  if (report.toneSource === 'none') return 'No steady tone found; give --fundamental <Hz> to measure one.';
  if (report.toneSource === 'not-found') return `${report.toneNote ?? 'no tone at the given fundamental'}.`;
  return report.toneSource === 'given' ? 'Tone measured at the given fundamental.' : 'Steady tone detected.';
}

export function formatAnalyzeSummary(report: AnalyzeReport): string {
  const parts = [`${describeTake(report)}\n\n`, formatRows(['level', 'value'], levelRows(report)), `\n${describeTone(report)}\n`];
  if (report.fundamentalHz !== null) {
    parts.push('\n', formatRows(['tone', 'value'], toneRows(report)));
    if (report.harmonics.length > 0) parts.push('\n', formatRows(['order', 'Hz', 'dBc'], harmonicRows(report)));
  }
  return parts.join('');
}

export async function renderAnalyzePlots(report: AnalyzeReport): Promise<NamedSvg[]> {
  const plots: NamedSvg[] = [];
  if (report.spectrum.length > 0) {
    const topDb = Math.ceil(Math.max(...report.spectrum.map((p) => p.db)) / 10) * 10;
    plots.push({
      name: 'spectrum',
      svg: await renderLinePlotSvg({
        title: `Long-term average spectrum: ${report.file}`,
        xLabel: FREQUENCY_AXIS,
        yLabel: SPECTRUM_LEVEL_AXIS,
        xScale: 'log',
        yDomain: [topDb - SPECTRUM_RANGE_DB, topDb],
        series: [{ name: 'spectrum', points: report.spectrum.map((p) => ({ x: p.hz, y: p.db })) }],
        rules: report.fundamentalHz === null ? [] : [{ x: report.fundamentalHz, label: 'fundamental' }],
      }),
    });
  }
  if (report.fundamentalHz !== null && report.harmonics.length > 0) {
    const stems = [{ x: 1, y: 0 }, ...report.harmonics.map((h) => ({ x: h.order, y: Math.max(HARMONIC_FLOOR_DBC, h.dbc) }))];
    plots.push({
      name: 'harmonics',
      svg: await renderStemPlotSvg({
        title: `Harmonics of ${report.fundamentalHz.toFixed(1)} Hz`,
        xLabel: 'harmonic order',
        yLabel: 'level (dBc)',
        baseline: HARMONIC_FLOOR_DBC,
        yDomain: [HARMONIC_FLOOR_DBC, 10],
        stems,
      }),
    });
  }
  return plots;
}

export function buildAnalyzeHtml(report: AnalyzeReport, plots: readonly NamedSvg[]): string {
  const figure = (name: string, caption: string) => {
    const plot = plots.find((p) => p.name === name);
    return plot ? [{ svg: plot.svg, caption }] : [];
  };
  const sections: HtmlSection[] = [
    { heading: 'Levels', tables: [{ columns: ['level', 'value'], rows: levelRows(report), numericColumns: [1] }] },
    {
      heading: 'Tone',
      paragraphs: [describeTone(report)],
      tables:
        report.fundamentalHz === null
          ? []
          : [
              { columns: ['tone', 'value'], rows: toneRows(report), numericColumns: [1] },
              { columns: ['order', 'Hz', 'dBc'], rows: harmonicRows(report), numericColumns: [0, 1, 2] },
            ],
      figures: figure('harmonics', 'Harmonic levels relative to the fundamental (order 1 = 0 dBc).'),
    },
    {
      heading: 'Spectrum',
      figures: figure(
        'spectrum',
        "Welch long-term average spectrum (Hann, 50 % overlap), strongest bin per band; a 0 dBFS sine reads 0 dB.",
      ),
    },
  ];
  return buildHtmlReport({ title: `clipbench analysis: ${report.file}`, subtitle: describeTake(report), sections, footer: 'clipbench analyze' });
}

export async function writeAnalyzeJson(path: string, report: AnalyzeReport): Promise<void> {
  assertNotAnInput(path, [report.file]);
  await writeJsonReport(path, report);
}

/** Writes the HTML report and its plots as SVG beside it; returns the SVG paths. */
export async function writeAnalyzeHtml(path: string, report: AnalyzeReport): Promise<string[]> {
  const plots = await renderAnalyzePlots(report);
  for (const target of [path, ...plots.map((p) => svgPathBeside(path, p.name))]) assertNotAnInput(target, [report.file]);
  return writeHtmlReport(path, buildAnalyzeHtml(report, plots), plots);
}
