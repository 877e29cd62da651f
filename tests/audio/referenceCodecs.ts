/** Typed wrappers over the npm reference codecs wav-decoder and wav-encoder (CommonJS, untyped). */
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

interface DecodedAudio {
  sampleRate: number;
  channelData: Float32Array[];
}

interface WavDecoderModule {
  decode: { sync(buffer: ArrayBuffer, options?: { symmetric?: boolean }): DecodedAudio };
}

interface WavEncoderModule {
  encode: {
    sync(audio: DecodedAudio, options: { bitDepth?: number; float?: boolean; symmetric?: boolean }): ArrayBuffer;
  };
}

const wavDecoder = require('wav-decoder') as WavDecoderModule;
const wavEncoder = require('wav-encoder') as WavEncoderModule;

/** wav-decoder with code / 2^(bits-1) scaling for every code. */
export function referenceDecode(bytes: Uint8Array): DecodedAudio {
  const copy = bytes.slice().buffer;
  return wavDecoder.decode.sync(copy, { symmetric: true });
}

/** wav-encoder with round(x * 2^(bits-1)) and clipping, or 32-bit float. */
export function referenceEncode(channelData: Float32Array[], sampleRate: number, bits: '16' | '24' | '32f'): Uint8Array {
  const options = bits === '32f' ? { float: true } : { bitDepth: Number(bits), symmetric: true };
  return new Uint8Array(wavEncoder.encode.sync({ sampleRate, channelData }, options));
}
