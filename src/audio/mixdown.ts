/** Mono fold-down: the mean of the channels, in double precision. */
export function monoFoldDown(channels: readonly Float32Array[]): Float64Array {
  const mono = new Float64Array(channels[0]?.length ?? 0);
  for (const channel of channels) for (let i = 0; i < mono.length; i++) mono[i] += channel[i];
  const scale = 1 / Math.max(1, channels.length);
  for (let i = 0; i < mono.length; i++) mono[i] *= scale;
  return mono;
}
