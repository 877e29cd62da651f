/** Level statistics of multichannel signals, in the units they are given (volts here). */

export interface LevelStats {
  peakVolts: number;
  rmsVolts: number;
  /** Peak over RMS in dB; 0 for silence. */
  crestDb: number;
}

export function measureLevels(channels: readonly Float64Array[]): LevelStats {
  let peak = 0;
  let sumSquares = 0;
  let count = 0;
  for (const channel of channels) {
    for (let i = 0; i < channel.length; i++) {
      const x = channel[i];
      const magnitude = Math.abs(x);
      if (magnitude > peak) peak = magnitude;
      sumSquares += x * x;
    }
    count += channel.length;
  }
  const rms = count > 0 ? Math.sqrt(sumSquares / count) : 0;
  return { peakVolts: peak, rmsVolts: rms, crestDb: rms > 0 ? 20 * Math.log10(peak / rms) : 0 };
}

/** dB relative to full scale for a value in volts; -Infinity becomes null in JSON, so clamp to -999. */
export function voltsToDbfs(volts: number, voltsAtFullScale: number): number {
  if (volts <= 0) return -999;
  return 20 * Math.log10(volts / voltsAtFullScale);
}

export interface OverReport {
  /** Samples (over all channels) whose magnitude exceeds digital full scale. */
  count: number;
  /** Time of the first over in seconds, or null. */
  firstSeconds: number | null;
  /** Highest magnitude in dBFS (can be above 0). */
  maxDbfs: number;
}

export function findOvers(channels: readonly Float64Array[], voltsAtFullScale: number, sampleRate: number): OverReport {
  let count = 0;
  let first = Infinity;
  let peak = 0;
  for (const channel of channels) {
    for (let i = 0; i < channel.length; i++) {
      const magnitude = Math.abs(channel[i]);
      if (magnitude > peak) peak = magnitude;
      if (magnitude > voltsAtFullScale) {
        count++;
        if (i < first) first = i;
      }
    }
  }
  return {
    count,
    firstSeconds: count > 0 ? first / sampleRate : null,
    maxDbfs: voltsToDbfs(peak, voltsAtFullScale),
  };
}
