// Seeded pseudo-random numbers for simulations, Monte-Carlo checks and tests. Pure TypeScript.
//
// Generator: xoshiro128** (Blackman & Vigna, 2018; 32-bit state words, period 2^128 − 1), seeded
// through splitmix32 so that nearby integer seeds give unrelated streams. Normal deviates by the
// Box–Muller transform (textbook), caching the second deviate of each pair.
// Not for cryptography.

export interface Rng {
  /** Uniform on [0, 1) with 32 random bits. */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
  /** Uniform 32-bit unsigned integer. */
  uint32(): number;
  /** Fills `out` with N(0, std²) deviates and returns it. */
  fillNormal(out: Float64Array, std?: number): Float64Array;
}

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/**
 * Creates a seeded generator. The same seed always gives the same stream. `seed` may be any
 * finite number; its integer part modulo 2^32 (plus the high part, mixed in) is used.
 */
export function createRng(seed: number): Rng {
  if (!Number.isFinite(seed)) throw new RangeError(`createRng: seed must be a finite number, got ${seed}`);
  const hi = Math.floor(seed / 4294967296) >>> 0;
  const sm = splitmix32((seed >>> 0) ^ Math.imul(hi, 0x27d4eb2d));
  let s0 = sm(), s1 = sm(), s2 = sm(), s3 = sm();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point

  const uint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };
  const uniform = (): number => uint32() / 4294967296;

  let spare = 0;
  let hasSpare = false;
  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    // 1 − u lies in (0, 1], so the logarithm is finite.
    const u1 = 1 - uniform();
    const u2 = uniform();
    const r = Math.sqrt(-2 * Math.log(u1));
    const a = 2 * Math.PI * u2;
    spare = r * Math.sin(a);
    hasSpare = true;
    return r * Math.cos(a);
  };
  const fillNormal = (out: Float64Array, std = 1): Float64Array => {
    for (let i = 0; i < out.length; i++) out[i] = std * normal();
    return out;
  };
  return { uniform, normal, uint32, fillNormal };
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
