/** Mono fold-down: the mean of the channels, in double precision. */
export function monoFoldDown(channels: readonly Float32Array[]): Float64Array {
  const mono = new Float64Array(channels[0]?.length ?? 0);
  if (channels.length === 0) return mono;
  mono.set(channels[0]); // a native converting copy: a mono take needs nothing more
  for (let c = 1; c < channels.length; c++) {
    const channel = channels[c];
    for (let i = 0; i < mono.length; i++) mono[i] += channel[i];
  }
  if (channels.length > 1) {
    const scale = 1 / channels.length;
    for (let i = 0; i < mono.length; i++) mono[i] *= scale;
  }
  return mono;
}
