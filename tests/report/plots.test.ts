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

  it('keeps 14 series readable: legend in the given order, every label whole, every line its own colour', async () => {
    const names = Array.from({ length: 14 }, (_, i) => `${i + 1}. clip.diode=1n4148, drive=0.${i} (a label longer than vega cuts by default)`);
    const svg = await renderLinePlotSvg({
      title: 'Players',
      xLabel: 'frequency (Hz)',
      yLabel: 'level (dB re full-scale sine)',
      xScale: 'log',
      series: names.map((name, i) => ({ name, points: [{ x: 100, y: -i }, { x: 1000, y: -2 * i }] })),
    });
    const positions = names.map((name) => svg.indexOf(name));
    for (const position of positions) expect(position).toBeGreaterThan(0); // whole, not cut with an ellipsis
    for (let i = 1; i < positions.length; i++) expect(positions[i]).toBeGreaterThan(positions[i - 1]); // "10." after "9."
    const strokes = new Set([...svg.matchAll(/stroke="(#[0-9a-f]{6})"/gi)].map((m) => m[1].toLowerCase()));
    expect(strokes.size).toBeGreaterThanOrEqual(14);
  });
});
