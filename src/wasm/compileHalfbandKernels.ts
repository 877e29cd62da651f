/**
 * Build step (`npm run build`): assembles the half-band kernels' WebAssembly text (halfbandWat.ts)
 * into dist/wasm/halfbandKernels.wasm with wabt, the WebAssembly Binary Toolkit (a development
 * dependency; the program itself only loads the binary).
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import wabtInit from 'wabt';
import { writeFileAtomic } from '../audio/atomicWrite.js';
import { halfbandKernelsWat } from './halfbandWat.js';
import { HALFBAND_KERNELS_PATH } from './halfbandKernels.js';

const wabt = await wabtInit();
const parsed = wabt.parseWat('halfbandKernels.wat', halfbandKernelsWat(), { simd: true });
parsed.validate();
const { buffer } = parsed.toBinary({ canonicalize_lebs: true });
parsed.destroy();
mkdirSync(path.dirname(HALFBAND_KERNELS_PATH), { recursive: true });
await writeFileAtomic(HALFBAND_KERNELS_PATH, Buffer.from(buffer));
