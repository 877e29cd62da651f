/**
 * Child process of the benchmark: renders one take through one design exactly as `render` does and
 * prints its own memory figures as JSON: peak RSS, the RSS before reading the take (modules loaded)
 * and the size of the decoded audio (4 bytes per sample).
 * Usage: node dist/bench/memoryProbe.js <design.json> <take.wav> <outDir>
 */
import { readFileSync } from 'node:fs';
import { runRenderJob } from '../render/renderJob.js';

/**
 * Peak resident memory of this process in MiB. On Linux, VmHWM from /proc/self/status: getrusage's
 * maxRSS survives exec, so in a freshly spawned process it can still hold the parent's peak.
 */
function peakRssMiB(): number {
  try {
    const match = /^VmHWM:\s+(\d+) kB$/m.exec(readFileSync('/proc/self/status', 'utf8'));
    if (match) return Number(match[1]) / 1024;
  } catch {
    // not Linux: fall through
  }
  return process.resourceUsage().maxRSS / 1024;
}

const [designPath, inputPath, outputDir] = process.argv.slice(2);
const mib = (bytes: number): number => bytes / 2 ** 20;
const baselineMiB = mib(process.memoryUsage().rss);
const result = await runRenderJob({
  designPath,
  overrides: [],
  inputPath,
  outputDir,
  oversample: 8,
  scale: { fullScaleVolts: 1 },
  bits: '24',
});
const decodedMiB = mib(result.summary.seconds * result.summary.sampleRate * result.summary.channels * 4);
process.stdout.write(`${JSON.stringify({ peakRssMiB: peakRssMiB(), baselineMiB, decodedMiB })}\n`);
