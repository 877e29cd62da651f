// Tests for src/circuit/kernelWarmUp.ts: after the warm-up, a render whose loud part (rails,
// conduction) starts only after V8 has optimised the kernels on a quiet part deoptimises no kernel
// for lack of type feedback. V8's own --trace-deopt output is the witness; the render runs the
// built program (dist, built by `pretest`) in a child process.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const dist = fileURLToPath(new URL('../../dist/', import.meta.url));
const designs = fileURLToPath(new URL('../../fixtures/designs/', import.meta.url));

const script = `
import { loadPartsLibrary } from '${dist}design/parts.js';
import { readDesignFile } from '${dist}design/parseDesign.js';
import { resolveDesign } from '${dist}design/resolve.js';
import { buildChain } from '${dist}circuit/chain.js';
import { renderChannel } from '${dist}circuit/renderChannel.js';
import { readdirSync } from 'node:fs';
const rate = 48000;
const take = new Float64Array(6 * rate);
// 3 s at 1 mV (no conduction, no rails), then 3 s at 2 V (both).
for (let n = 0; n < take.length; n++) take[n] = (n < 3 * rate ? 1e-3 : 2) * Math.sin((2 * Math.PI * 196 * n) / rate);
// Every bundled design: fused pairs, clippers alone, gain stages with feedback diodes.
for (const file of readdirSync(${JSON.stringify(designs)}).filter((f) => f.endsWith('.json'))) {
  const design = resolveDesign(await readDesignFile(${JSON.stringify(designs)} + file, loadPartsLibrary()));
  renderChannel(buildChain(design, { sampleRate: rate, oversample: 8 }), take);
}
console.log('rendered');
`;

describe('kernel warm-up', () => {
  it('a late loud passage deoptimises no kernel for missing type feedback, in any bundled design', () => {
    const child = spawnSync(process.execPath, ['--trace-deopt', '--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(child.stderr).toBe('');
    expect(child.stdout).toContain('rendered');
    const feedbackDeopts = child.stdout
      .split('\n')
      .filter((line) => line.includes('bailout') && line.includes('Insufficient type feedback'))
      .filter((line) => line.includes('<JSFunction process '));
    expect(feedbackDeopts).toEqual([]);
  }, 60000);
});
