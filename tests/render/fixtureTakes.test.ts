import { readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readWavFile } from '../../src/audio/wavRead.js';
import { loadPartsLibrary } from '../../src/design/parts.js';
import { readDesignFile } from '../../src/design/parseDesign.js';
import { resolveDesign } from '../../src/design/resolve.js';
import { renderTakeInPlace } from '../../src/render/renderTake.js';
import { PROJECT_ROOT } from '../helpers/cli.js';

const designsDir = path.join(PROJECT_ROOT, 'fixtures', 'designs');
const takesDir = path.join(PROJECT_ROOT, 'fixtures', 'takes');
const designs = readdirSync(designsDir).filter((name) => name.endsWith('.json'));
const takes = readdirSync(takesDir).filter((name) => name.endsWith('.wav'));

describe('bundled designs on the bundled takes', () => {
  it.each(designs.flatMap((design) => takes.map((take) => [design, take] as const)))('%s renders %s', async (design, take) => {
    const resolved = resolveDesign(await readDesignFile(path.join(designsDir, design), loadPartsLibrary()));
    const wav = await readWavFile(path.join(takesDir, take));
    const frames = wav.frames;
    const summary = renderTakeInPlace(resolved, wav, { oversample: 2, scale: { fullScaleVolts: 1 } });
    expect(wav.frames).toBe(frames);
    for (const channel of wav.channels) expect(channel.every(Number.isFinite)).toBe(true);
    // A design at its settings passes the take on, and where it has diodes they conduct on it.
    expect(summary.output.peakVolts).toBeGreaterThan(0);
    const meters = Object.values(summary.conducting);
    if (meters.length > 0) expect(Math.max(...meters)).toBeGreaterThan(0);
  });
});
