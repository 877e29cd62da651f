/**
 * WebAssembly text of the half-band kernels (halfbandFilters.ts describes the filters). Two output
 * samples are computed at once in the two f64 lanes of a 128-bit SIMD register: every lane performs
 * exactly the scalar operations of its own output, in the same order, so results do not depend on
 * lane, block size or kernel variant.
 *
 * Interpolator, arm half K, input x with its history (2K - 1 samples) at the front, taps c_t = 2 h:
 *   y[2n] = c_0 (x[n+L] + x[n]) + c_1 (x[n+L-1] + x[n+1]) + ...,   y[2n+1] = x[n+K]
 * with L = 2K - 1 and x indexed from the start of the buffer (the oldest sample any output reads).
 *
 * Decimator: the branch reads one phase of the input and the centre tap the other, so the kernel
 * first splits the input into E (branch phase) and O (centre phase), which turns the stride-2 reads
 * into contiguous ones:
 *   y[n] = 0.5 O[n] + c_0 (E[n+L] + E[n]) + c_1 (E[n+L-1] + E[n+1]) + ...
 * With `start` the index of the newest branch sample of output 0 and span = 2L,
 *   E[m] = x[start - span + 2m],  O[n] = x[start - L + 2n],
 * and one 128-bit load at x[start - L + 2n] holds O[n] and E[n + K].
 *
 * Arm halves up to MAX_UNROLLED_HALF_ARM get a kernel with the tap loop written out (the taps are
 * read with constant offsets); longer ones run a loop over the taps. All kernels share one signature
 * so the caller picks one by name at construction.
 */

/** Longest arm half with a written-out kernel (covers every stage at 44.1 kHz and above). */
export const MAX_UNROLLED_HALF_ARM = 40;

const F64 = 8;
/** Lane 0 of both operands: (a0, b0); lane 1 of both: (a1, b1). */
const LOW_LANES = 'i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23';
const HIGH_LANES = 'i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31';

const range = (length: number): number[] => Array.from({ length }, (_, i) => i);

/** Arm halves up to this many keep their taps in locals for the whole block. */
const TAPS_IN_LOCALS = 12;

function tapValue(t: number, halfArm: number): string {
  return halfArm <= TAPS_IN_LOCALS ? `(local.get $c${t})` : `(v128.load64_splat offset=${F64 * t} (local.get $taps))`;
}

/** Locals and their loads for the taps of a written-out kernel. */
function tapLocals(halfArm: number | null): { declare: string; load: string } {
  if (halfArm === null || halfArm > TAPS_IN_LOCALS) return { declare: '', load: '' };
  return {
    declare: range(halfArm).map((t) => `(local $c${t} v128)`).join(' '),
    load: range(halfArm).map((t) => `(local.set $c${t} (v128.load64_splat offset=${F64 * t} (local.get $taps)))`).join('\n'),
  };
}

/** Folded tap t with constant offsets from the window base $p (taps from $taps). */
function unrolledTerm(t: number, halfArm: number): string {
  const last = 2 * halfArm - 1;
  return (
    `(f64x2.mul ${tapValue(t, halfArm)} ` +
    `(f64x2.add (v128.load offset=${F64 * (last - t)} (local.get $p)) (v128.load offset=${F64 * t} (local.get $p))))`
  );
}

/** acc = first + sum of the folded taps in order, for a fixed K. */
function unrolledSum(first: string | null, halfArm: number): string {
  let sum = first;
  for (const t of range(halfArm)) {
    const term = unrolledTerm(t, halfArm);
    sum = sum === null ? term : `(f64x2.add ${sum} ${term})`;
  }
  return `(local.set $acc ${sum})`;
}

/** The same sum with a loop over the taps (K in $K): first term, then acc += term. */
function loopedSum(first: string | null): string {
  const term =
    '(f64x2.mul (v128.load64_splat (local.get $tap)) (f64x2.add (v128.load (local.get $hi)) (v128.load (local.get $lo))))';
  return `
    (local.set $tap (local.get $taps))
    (local.set $hi (i32.add (local.get $p) (i32.shl (i32.sub (i32.shl (local.get $K) (i32.const 1)) (i32.const 1)) (i32.const 3))))
    (local.set $lo (local.get $p))
    (local.set $t (i32.const 0))
    ${first === null ? `(local.set $acc ${term})` : `(local.set $acc (f64x2.add ${first} ${term}))`}
    (block $tapLoopDone
      (loop $tapLoop
        (local.set $t (i32.add (local.get $t) (i32.const 1)))
        (br_if $tapLoopDone (i32.ge_s (local.get $t) (local.get $K)))
        (local.set $tap (i32.add (local.get $tap) (i32.const ${F64})))
        (local.set $hi (i32.sub (local.get $hi) (i32.const ${F64})))
        (local.set $lo (i32.add (local.get $lo) (i32.const ${F64})))
        (local.set $acc (f64x2.add (local.get $acc) ${term}))
        (br $tapLoop)))`;
}

const LOOP_LOCALS = '(local $tap i32) (local $hi i32) (local $lo i32) (local $t i32)';

/** Interpolator: params (buffer, taps, K, count, out), byte addresses except K and count; 2 count outputs. */
function interpolator(name: string, sum: string, halfArm: number | null): string {
  // Delayed copy y[2n+1] = x[n + K]: at $p + 8K.
  const delayed =
    halfArm === null
      ? '(v128.load (i32.add (local.get $p) (i32.shl (local.get $K) (i32.const 3))))'
      : `(v128.load offset=${F64 * halfArm} (local.get $p))`;
  return `
  (func (export "${name}") (type $interpolate) (param $buf i32) (param $taps i32) (param $K i32) (param $count i32) (param $out i32)
    (local $p i32) (local $o i32) (local $n i32) (local $acc v128) (local $d v128) ${halfArm === null ? LOOP_LOCALS : ''}
    ${tapLocals(halfArm).declare}
    ${tapLocals(halfArm).load}
    (local.set $p (local.get $buf))
    (local.set $o (local.get $out))
    (block $done
      (loop $pairs
        (br_if $done (i32.ge_s (local.get $n) (local.get $count)))
        ${sum}
        (local.set $d ${delayed})
        (v128.store (local.get $o) (${LOW_LANES} (local.get $acc) (local.get $d)))
        ;; an odd last output: its pair partner is not stored
        (br_if $done (i32.ge_s (i32.add (local.get $n) (i32.const 1)) (local.get $count)))
        (v128.store offset=16 (local.get $o) (${HIGH_LANES} (local.get $acc) (local.get $d)))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (local.set $o (i32.add (local.get $o) (i32.const 32)))
        (local.set $n (i32.add (local.get $n) (i32.const 2)))
        (br $pairs))))`;
}

/**
 * Decimator: params (buffer, start, taps, K, count, out, scratch); `scratch` holds O (count + K
 * samples, rounded up to even) then E. See the module comment for the split.
 */
function decimator(name: string, sum: string, halfArm: number | null): string {
  return `
  (func (export "${name}") (type $decimate) (param $buf i32) (param $start i32) (param $taps i32) (param $K i32) (param $count i32) (param $out i32) (param $scratch i32)
    (local $p i32) (local $q i32) (local $o i32) (local $n i32) (local $acc v128) (local $pair v128)
    (local $odd i32) (local $even i32) (local $src i32) (local $end i32) ${halfArm === null ? LOOP_LOCALS : ''}
    ${tapLocals(halfArm).declare}
    ${tapLocals(halfArm).load}
    ;; O at scratch, E after it (both 16-byte aligned)
    (local.set $odd (local.get $scratch))
    (local.set $even (i32.add (local.get $scratch)
      (i32.shl (i32.and (i32.add (i32.add (local.get $count) (local.get $K)) (i32.const 2)) (i32.const -2)) (i32.const 3))))
    ;; E[0..K-1] = x[start - span + 2m]
    (local.set $src (i32.add (local.get $buf)
      (i32.shl (i32.sub (local.get $start) (i32.shl (i32.sub (i32.shl (local.get $K) (i32.const 1)) (i32.const 1)) (i32.const 1))) (i32.const 3))))
    (local.set $p (local.get $even))
    (local.set $end (i32.add (local.get $even) (i32.shl (local.get $K) (i32.const 3))))
    (block $headDone
      (loop $head
        (br_if $headDone (i32.ge_u (local.get $p) (local.get $end)))
        (f64.store (local.get $p) (f64.load (local.get $src)))
        (local.set $src (i32.add (local.get $src) (i32.const 16)))
        (local.set $p (i32.add (local.get $p) (i32.const ${F64})))
        (br $head)))
    ;; for n = 0 .. count + K - 2: (O[n], E[n + K]) = (x[start - L + 2n], x[start - L + 2n + 1])
    (local.set $src (i32.add (local.get $buf)
      (i32.shl (i32.add (i32.sub (local.get $start) (i32.shl (local.get $K) (i32.const 1))) (i32.const 1)) (i32.const 3))))
    (local.set $q (local.get $odd))
    (local.set $end (i32.add (local.get $odd) (i32.shl (i32.sub (i32.add (local.get $count) (local.get $K)) (i32.const 1)) (i32.const 3))))
    (block $splitDone
      (loop $split
        (br_if $splitDone (i32.ge_u (local.get $q) (local.get $end)))
        (local.set $pair (v128.load (local.get $src)))
        (v128.store64_lane 0 (local.get $q) (local.get $pair))
        (v128.store64_lane 1 (local.get $p) (local.get $pair))
        (local.set $src (i32.add (local.get $src) (i32.const 16)))
        (local.set $q (i32.add (local.get $q) (i32.const ${F64})))
        (local.set $p (i32.add (local.get $p) (i32.const ${F64})))
        (br $split)))
    (local.set $p (local.get $even))
    (local.set $q (local.get $odd))
    (local.set $o (local.get $out))
    (block $done
      (loop $pairs
        (br_if $done (i32.ge_s (local.get $n) (local.get $count)))
        ${sum}
        (if (i32.ge_s (i32.add (local.get $n) (i32.const 1)) (local.get $count))
          (then
            (v128.store64_lane 0 (local.get $o) (local.get $acc))
            (br $done)))
        (v128.store (local.get $o) (local.get $acc))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (local.set $q (i32.add (local.get $q) (i32.const 16)))
        (local.set $o (i32.add (local.get $o) (i32.const 16)))
        (local.set $n (i32.add (local.get $n) (i32.const 2)))
        (br $pairs))))`;
}

/** The centre term of the decimator: 0.5 O[n]. */
const CENTRE = '(f64x2.mul (v128.const f64x2 0.5 0.5) (v128.load (local.get $q)))';

/** Samples of decimator scratch (O and E) for `count` outputs with arm half K. */
export function decimatorScratchLength(maxCount: number, halfArm: number): number {
  const odd = (maxCount + halfArm + 2) & ~1;
  return odd + maxCount + 2 * halfArm + 2;
}

/** Name of the export for arm half K. */
export function kernelName(kind: 'interpolate' | 'decimate', halfArm: number): string {
  return halfArm <= MAX_UNROLLED_HALF_ARM ? `${kind}${halfArm}` : `${kind}Looped`;
}

/** The whole module: memory imported as env.memory. */
export function halfbandKernelsWat(): string {
  const unrolled = range(MAX_UNROLLED_HALF_ARM).map((i) => i + 1);
  return `(module
  (type $interpolate (func (param i32 i32 i32 i32 i32)))
  (type $decimate (func (param i32 i32 i32 i32 i32 i32 i32)))
  (import "env" "memory" (memory 1))
  ${unrolled.map((k) => interpolator(kernelName('interpolate', k), unrolledSum(null, k), k)).join('\n')}
  ${interpolator('interpolateLooped', loopedSum(null), null)}
  ${unrolled.map((k) => decimator(kernelName('decimate', k), unrolledSum(CENTRE, k), k)).join('\n')}
  ${decimator('decimateLooped', loopedSum(CENTRE), null)}
)
`;
}
