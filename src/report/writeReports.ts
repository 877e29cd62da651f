/**
 * Writing report files: JSON, HTML and the SVG of each plot beside the HTML, each through
 * `writeFileAtomic` so a report appears complete or not at all.
 */
import { basename, dirname, extname, join } from 'node:path';
import { writeFileAtomic } from '../audio/atomicWrite.js';

/**
 * Pretty JSON (2-space indent, trailing newline). A NaN or infinity is a program error (JSON would
 * silently turn it into null), so it throws, naming the key.
 */
export function toJsonText(data: unknown): string {
  const text = JSON.stringify(
    data,
    (key, value: unknown) => {
      if (typeof value === 'number' && !Number.isFinite(value)) {
        throw new Error(`report JSON: key "${key}" holds ${value}; report values must be finite or null`);
      }
      return value;
    },
    2,
  );
  return `${text}\n`;
}

export async function writeJsonReport(path: string, data: unknown): Promise<void> {
  await writeFileAtomic(path, toJsonText(data));
}

export interface NamedSvg {
  /** Short name used in the file name, e.g. "spectrum". */
  name: string;
  svg: string;
}

/** `report.html` + "spectrum" -> `report-spectrum.svg` in the same folder. */
export function svgPathBeside(htmlPath: string, name: string): string {
  const stem = basename(htmlPath, extname(htmlPath));
  return join(dirname(htmlPath), `${stem}-${name}.svg`);
}

/** Writes the HTML and each plot as an SVG beside it; returns the SVG paths written. */
export async function writeHtmlReport(htmlPath: string, html: string, plots: readonly NamedSvg[]): Promise<string[]> {
  const written: string[] = [];
  for (const plot of plots) {
    const path = svgPathBeside(htmlPath, plot.name);
    await writeFileAtomic(path, plot.svg);
    written.push(path);
  }
  await writeFileAtomic(htmlPath, html);
  return written;
}
