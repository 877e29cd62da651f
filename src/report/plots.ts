/**
 * Plots as SVG: vega-lite specifications compiled to vega and rendered headless in Node
 * (`renderer: 'none'`, then `toSVG()`). Text in the SVG is escaped by vega; fonts are generic
 * families, so the SVG needs no network. Non-finite points (and non-positive ones on a log axis)
 * are dropped rather than drawn.
 */
import type { TopLevelSpec } from 'vega-lite';

export type AxisScale = 'linear' | 'log';

export interface PlotPoint {
  x: number;
  y: number;
}

export interface PlotSeries {
  name: string;
  points: readonly PlotPoint[];
}

/** A vertical marker line at `x`, labelled (e.g. the level where THD crosses 1 %). */
export interface PlotRule {
  x: number;
  label?: string;
}

export interface PlotFrame {
  title: string;
  xLabel: string;
  yLabel: string;
  xScale?: AxisScale;
  yScale?: AxisScale;
  /** Fixed y range [min, max]; default: fitted to the data. */
  yDomain?: readonly [number, number];
  widthPx?: number;
  heightPx?: number;
}

export interface LinePlotSpec extends PlotFrame {
  series: readonly PlotSeries[];
  rules?: readonly PlotRule[];
}

/** Vertical stems from `baseline` up (or down) to each value, e.g. a harmonic spectrum in dBc. */
export interface StemPlotSpec extends PlotFrame {
  stems: readonly (PlotPoint & { label?: string })[];
  baseline: number;
}

const DEFAULT_WIDTH_PX = 640;
const DEFAULT_HEIGHT_PX = 320;
const FONT = 'Helvetica, Arial, sans-serif';
/** Legend labels are shown whole up to this width (vega's default cuts them at 160 px). */
const LEGEND_LABEL_LIMIT_PX = 1000;
/** Dash patterns for series 21-40, 41-60, ... (solid for the first 20). */
const DASH_PATTERNS: readonly (readonly number[])[] = [[1, 0], [6, 3], [2, 2], [8, 3, 2, 3]];

/** Axis titles every page uses. */
export const FREQUENCY_AXIS = 'frequency (Hz)';
export const SPECTRUM_LEVEL_AXIS = 'level (dB re full-scale sine)';

function drawable(point: PlotPoint, frame: PlotFrame): boolean {
  if (!Number.isFinite(point.x) || !Number.isFinite(point.y)) return false;
  if (frame.xScale === 'log' && point.x <= 0) return false;
  if (frame.yScale === 'log' && point.y <= 0) return false;
  return true;
}

function axisEncoding(field: string, label: string, scale: AxisScale | undefined, domain?: readonly [number, number]) {
  return {
    field,
    type: 'quantitative' as const,
    title: label,
    // `zero` only applies to linear scales (vega-lite warns if it is set on a log scale).
    scale: { type: scale ?? 'linear', ...(domain ? { domain: [...domain] } : scale === 'log' ? {} : { zero: false }), nice: false },
  };
}

function frameProperties(frame: PlotFrame) {
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: frame.title,
    width: frame.widthPx ?? DEFAULT_WIDTH_PX,
    height: frame.heightPx ?? DEFAULT_HEIGHT_PX,
    background: 'white',
    config: { font: FONT, axis: { grid: true, gridOpacity: 0.5 } },
  };
}

/**
 * Compiles a vega-lite spec and renders it to an SVG string. vega and vega-lite are loaded on first
 * use, so commands that draw nothing start without them.
 */
export async function renderVegaLiteSvg(spec: TopLevelSpec): Promise<string> {
  const [vega, { compile }] = await Promise.all([import('vega'), import('vega-lite')]);
  const view = new vega.View(vega.parse(compile(spec).spec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

export async function renderLinePlotSvg(spec: LinePlotSpec): Promise<string> {
  const values = spec.series.flatMap((series) =>
    series.points.filter((p) => drawable(p, spec)).map((p) => ({ x: p.x, y: p.y, series: series.name })),
  );
  const rules = (spec.rules ?? []).filter((r) => Number.isFinite(r.x) && (spec.xScale !== 'log' || r.x > 0));
  const x = axisEncoding('x', spec.xLabel, spec.xScale);
  const y = axisEncoding('y', spec.yLabel, spec.yScale, spec.yDomain);
  const showLegend = spec.series.length > 1;
  // Series keep their given order in the legend (not sorted as text: "10." after "9."), get distinct
  // colours (20 of them past 10 series), a dash pattern past 20, full labels, and columns across the width.
  const names = spec.series.map((series) => series.name);
  const legend = showLegend ? { orient: 'bottom' as const, columns: names.length > 4 ? 3 : names.length, labelLimit: LEGEND_LABEL_LIMIT_PX, symbolType: 'stroke' as const } : null;
  const lineLayer = {
    data: { values },
    mark: { type: 'line' as const, strokeWidth: 1.5, clip: true },
    encoding: {
      x,
      y,
      color: { field: 'series', type: 'nominal' as const, title: null, sort: names, scale: { domain: names, scheme: names.length > 10 ? 'category20' : 'tableau10' }, legend },
      ...(names.length > 20
        ? { strokeDash: { field: 'series', type: 'nominal' as const, sort: names, scale: { domain: names, range: names.map((_, i) => DASH_PATTERNS[Math.floor(i / 20) % DASH_PATTERNS.length]) }, legend: null } }
        : {}),
    },
  };
  const ruleLayers = rules.length
    ? [
        {
          data: { values: rules.map((r) => ({ x: r.x, label: r.label ?? '' })) },
          mark: { type: 'rule' as const, color: '#b33', strokeDash: [4, 3] },
          encoding: { x: { field: 'x', type: 'quantitative' as const } },
        },
        {
          data: { values: rules.map((r) => ({ x: r.x, label: r.label ?? '' })) },
          mark: { type: 'text' as const, color: '#b33', align: 'left' as const, dx: 3, dy: 4, baseline: 'top' as const, y: 0 },
          encoding: { x: { field: 'x', type: 'quantitative' as const }, text: { field: 'label', type: 'nominal' as const } },
        },
      ]
    : [];
  return renderVegaLiteSvg({ ...frameProperties(spec), layer: [lineLayer, ...ruleLayers] } as TopLevelSpec);
}

export async function renderStemPlotSvg(spec: StemPlotSpec): Promise<string> {
  const values = spec.stems
    .filter((p) => drawable(p, spec))
    .map((p) => ({ x: p.x, y: p.y, base: spec.baseline, label: p.label ?? '' }));
  const x = axisEncoding('x', spec.xLabel, spec.xScale);
  const y = axisEncoding('y', spec.yLabel, spec.yScale, spec.yDomain);
  const stemLayer = {
    mark: { type: 'rule' as const, strokeWidth: 2, color: '#1f5f99' },
    encoding: { x, y, y2: { field: 'base' } },
  };
  const headLayer = {
    mark: { type: 'point' as const, filled: true, color: '#1f5f99', size: 30 },
    encoding: { x, y },
  };
  const labelLayer = {
    mark: { type: 'text' as const, dy: -8, fontSize: 10 },
    encoding: { x, y, text: { field: 'label', type: 'nominal' as const } },
  };
  return renderVegaLiteSvg({
    ...frameProperties(spec),
    data: { values },
    layer: [stemLayer, headLayer, labelLayer],
  } as TopLevelSpec);
}
