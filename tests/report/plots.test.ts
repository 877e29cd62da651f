import { describe, expect, it } from 'vitest';
import { renderLinePlotSvg, renderStemPlotSvg } from '../../src/report/plots.js';

describe('plots (vega-lite rendered to SVG in Node)', () => {
  it('renders a log-x line plot with two series, marker rules and escaped text', async () => {
    const svg = await renderLinePlotSvg({
      title: 'Spectrum of <script>alert("x")</script> & co',
      xLabel: 'Frequency (Hz)',
      yLabel: 'Level (dB)',
      xScale: 'log',
      series: [
        { name: 'left', points: [{ x: 20, y: -60 }, { x: 1000, y: -3 }, { x: 20000, y: -80 }, { x: 0, y: 1 }] },
        { name: 'right', points: [{ x: 20, y: -50 }, { x: 1000, y: Number.NaN }, { x: 20000, y: -70 }] },
      ],
      rules: [{ x: 1000, label: '1 kHz' }],
    });
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).not.toMatch(/<script/i);
    expect(svg).toContain('&lt;script&gt;');
    expect(svg).toContain('1 kHz');
    expect(svg).toContain('Frequency (Hz)');
    expect(svg).not.toMatch(/NaN/);
  });

  it('renders a stem plot and is deterministic', async () => {
    const spec = {
      title: 'Harmonics',
      xLabel: 'Harmonic',
      yLabel: 'dBc',
      baseline: -120,
      stems: [
        { x: 2, y: -20, label: 'H2' },
        { x: 3, y: -35, label: 'H3' },
      ],
    };
    const first = await renderStemPlotSvg(spec);
    const second = await renderStemPlotSvg(spec);
    expect(first).toBe(second);
    expect(first).toContain('H3');
    expect(first).toContain('<line'); // stems are rule marks
  });
});
