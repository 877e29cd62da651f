/** JSON and HTML output of the `measure` bench. */
import type { MeasureReport } from '../analysis/measureDesign.js';
import { PREDICTION_BASIS } from '../analysis/response.js';
import { formatSignificant, formatValue } from './table.js';
import { buildHtmlReport, type HtmlSection } from './html.js';
import { renderLinePlotSvg, renderStemPlotSvg, type PlotRule, FREQUENCY_AXIS } from './plots.js';
import { writeHtmlReport, writeJsonReport, type NamedSvg } from './writeReports.js';

/** The caller has refused output paths that name an input (before measuring). */
export async function writeMeasureJson(path: string, report: MeasureReport): Promise<void> {
  await writeJsonReport(path, report);
}

async function measurePlots(report: MeasureReport): Promise<NamedSvg[]> {
  const onsetRules: PlotRule[] = (['1', '3', '10'] as const).flatMap((key) => {
    const volts = report.onset[key];
    return volts === null ? [] : [{ x: volts, label: `${key} %` }];
  });
  return [
    {
      name: 'harmonics',
      svg: await renderStemPlotSvg({
        title: `Harmonics at ${report.freqHz.toFixed(0)} Hz, ${report.levelVolts} V peak in`,
        xLabel: FREQUENCY_AXIS,
        yLabel: 'level (dBc)',
        baseline: -140,
        yDomain: [-140, 0],
        stems: report.harmonics.map((h) => ({ x: h.hz, y: Math.max(-140, h.dbc ?? -140), label: String(h.order) })),
      }),
    },
    {
      name: 'thd-by-level',
      svg: await renderLinePlotSvg({
        title: 'THD against input level',
        xLabel: 'input level (V peak)',
        yLabel: 'THD (%)',
        xScale: 'log',
        yScale: 'log',
        series: [{ name: 'THD', points: report.thdByLevel.flatMap((p) => (p.thdPercent === null ? [] : [{ x: p.volts, y: p.thdPercent }])) }],
        rules: onsetRules,
      }),
    },
    {
      name: 'response',
      svg: await renderLinePlotSvg({
        title: 'Small-signal frequency response (magnitude)',
        xLabel: FREQUENCY_AXIS,
        yLabel: 'gain (dB)',
        xScale: 'log',
        series: [
          { name: 'predicted', points: report.response.flatMap((p) => (p.db === null ? [] : [{ x: p.hz, y: p.db }])) },
          { name: 'measured', points: report.responseMeasured.flatMap((p) => (p.db === null ? [] : [{ x: p.hz, y: p.db }])) },
        ],
      }),
    },
    {
      name: 'phase',
      svg: await renderLinePlotSvg({
        title: 'Small-signal frequency response (phase)',
        xLabel: FREQUENCY_AXIS,
        yLabel: 'phase (degrees)',
        xScale: 'log',
        series: [
          { name: 'predicted', points: report.response.map((p) => ({ x: p.hz, y: p.deg })) },
          { name: 'measured', points: report.responseMeasured.map((p) => ({ x: p.hz, y: p.deg })) },
        ],
      }),
    },
    {
      name: 'noise',
      svg: await renderLinePlotSvg({
        title: `Output noise density (input: ${report.noise.source})`,
        xLabel: FREQUENCY_AXIS,
        yLabel: 'noise (V per root Hz)',
        xScale: 'log',
        yScale: 'log',
        series: [{ name: 'output noise', points: report.noise.densityPerHz.map((p) => ({ x: p.hz, y: p.voltsPerRootHz })) }],
      }),
    },
    {
      name: 'transfer',
      svg: await renderLinePlotSvg({
        title: 'Static transfer curve',
        xLabel: 'input (V)',
        yLabel: 'output (V)',
        series: [{ name: 'vout', points: report.transfer.map((p) => ({ x: p.vin, y: p.vout })) }],
      }),
    },
  ];
}

function fmt(value: number | null, digits: number, unit: string): string {
  return value === null ? 'not reached' : `${value.toFixed(digits)} ${unit}`;
}

export async function writeMeasureHtml(path: string, report: MeasureReport): Promise<void> {
  const plots = await measurePlots(report);
  const figure = (name: string): { svg: string } => ({ svg: plots.find((p) => p.name === name)?.svg ?? '' });
  const sections: HtmlSection[] = [
    {
      heading: 'Summary',
      tables: [
        {
          columns: ['figure', 'value'],
          rows: [
            ['THD', formatSignificant(report.thdPercent, 4, '%')],
            ['THD+N', formatSignificant(report.thdnPercent, 4, '%')],
            ['small-signal gain', formatValue(report.gainDb, 2, 'dB')],
            ['maximum output swing', `${report.maxOutputVolts.toFixed(3)} V`],
            ['THD 1 % / 3 % / 10 % at input', [report.onset['1'], report.onset['3'], report.onset['10']].map((v) => fmt(v, 4, 'V')).join(' / ')],
            ['strongest alias', report.aliasDbc === null ? 'n/a (silent output)' : `${report.aliasDbc.toFixed(1)} dBc at ${report.aliasHz.toFixed(0)} Hz`],
          ],
        },
      ],
    },
    {
      heading: 'Harmonics',
      tables: [
        {
          columns: ['order', 'Hz', 'dBc', 'volts'],
          rows: report.harmonics.map((h) => [String(h.order), h.hz.toFixed(1), formatValue(h.dbc, 2), h.volts.toExponential(3)]),
          numericColumns: [0, 1, 2, 3],
        },
      ],
      figures: [figure('harmonics')],
    },
    { heading: 'THD against level', figures: [figure('thd-by-level')] },
    {
      heading: 'Frequency response',
      paragraphs: [
        report.responseDisagreement.length === 0
          ? `Predicted and measured (stepped sines through the full model, output at most 1 mV) agree within 0.1 dB (${PREDICTION_BASIS}).`
          : `Predicted and measured differ by more than 0.1 dB at ${report.responseDisagreement.map((d) => `${d.hz.toFixed(0)} Hz`).join(', ')}.`,
      ],
      figures: [figure('response'), figure('phase')],
    },
    { heading: 'Transfer curve', figures: [figure('transfer')] },
    {
      heading: 'Noise',
      paragraphs: [
        `Output noise with the input terminated by ${report.noise.source}: resistor thermal noise (4kTR), op-amp input noise (datasheet densities at 1 kHz, taken as white), junction shot noise (2qI) and JFET channel noise, each carried to the output through the small-signal model; powers add. A-weighting per IEC 61672-1; signal to noise against the output's fundamental at the reference tone (${report.noise.referenceVolts.toExponential(3)} V RMS).`,
      ],
      tables: [
        {
          columns: ['figure', 'value'],
          rows: [
            ['unweighted, 20 Hz-20 kHz', `${formatValue(report.noise.unweightedDbv, 1, 'dBV')} (${report.noise.unweightedVolts.toExponential(3)} V)`],
            ['A-weighted', `${formatValue(report.noise.aWeightedDbv, 1, 'dBV')} (${report.noise.aWeightedVolts.toExponential(3)} V)`],
            ['signal to noise (A-weighted)', formatValue(report.noise.snrDb, 1, 'dB')],
          ],
        },
        {
          columns: ['source', 'share of the noise power'],
          rows: report.noise.contributors.map((c) => [c.part, `${(c.share * 100).toFixed(1)} %`]),
          numericColumns: [1],
        },
      ],
      figures: [figure('noise')],
    },
  ];
  if (report.aliasByOversample.length > 1) {
    sections.push({
      heading: 'Aliasing by oversampling factor',
      tables: [
        {
          columns: ['factor', 'alias dBc', 'at Hz'],
          rows: report.aliasByOversample.map((a) => [String(a.oversample), formatValue(a.aliasDbc, 1), a.aliasHz.toFixed(0)]),
          numericColumns: [0, 1, 2],
        },
      ],
    });
  }
  const html = buildHtmlReport({
    title: `clipbench measurement: ${report.design}`,
    subtitle: `${report.freqHz.toFixed(1)} Hz test tone, ${report.levelVolts} V peak, ${report.sampleRate} Hz, oversampling ${report.oversample}x`,
    sections,
    footer: 'Written by clipbench measure. Renders and test tones can be loud: start playback at a low volume.',
  });
  await writeHtmlReport(path, html, plots);
}
