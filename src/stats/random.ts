// Seeded random numbers for generated-data tests, simulations and benchmarks. The core never calls Math.random:
// a caller passes a seed, so every run is reproducible. Generator: xoshiro128** (Blackman & Vigna, 2018),
// seeded through the splitmix32-style murmur3 finaliser; 53-bit doubles from two 32-bit outputs.
// Samplers: normal (Box–Muller), gamma (Marsaglia & Tsang 2000), Poisson (inversion for small means,
// Hörmann's PTRS transformed rejection 1993 for larger ones), negative binomial as a gamma–Poisson mixture.
// Constants of the published algorithms are recalled from memory; the tests check the resulting distributions
// against the exact pmf (chi-square) and moments.

import { NearcastError } from '../errors.ts';
import { logGamma } from './special-functions.ts';

export interface Rng {
  /** Uniform on [0, 1) with 53 random bits. */
  next(): number;
  /** Uniform 32-bit unsigned integer. */
  nextUint32(): number;
  /** The generator state, to resume the same stream later (plain JSON). */
  state(): RngState;
}

export type RngState = readonly [number, number, number, number];

function mix32(z: number): number {
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** A generator from an integer seed, or resumed from a saved state. */
export function createRng(seed: number | RngState): Rng {
  let s0: number;
  let s1: number;
  let s2: number;
  let s3: number;
  if (typeof seed === 'number') {
    if (!Number.isFinite(seed)) throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', ['seed must be a finite number']);
    // Fold the seed's high and low 32 bits in, so seeds beyond 2³² still differ.
    let x = (Math.floor(seed) >>> 0) ^ mix32(Math.floor(seed / 4294967296) >>> 0);
    const step = (): number => {
      x = (x + 0x9e3779b9) >>> 0;
      return mix32(x);
    };
    s0 = step();
    s1 = step();
    s2 = step();
    s3 = step();
  } else {
    [s0, s1, s2, s3] = seed.map((v) => v >>> 0) as [number, number, number, number];
  }
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point

  const nextUint32 = (): number => {
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
  return {
    nextUint32,
    next: () => ((nextUint32() >>> 5) * 67108864 + (nextUint32() >>> 6)) / 9007199254740992,
    state: () => [s0 >>> 0, s1 >>> 0, s2 >>> 0, s3 >>> 0],
  };
}

/** Standard normal deviate (Box–Muller; one of the pair is discarded to keep the sampler stateless). */
export function sampleNormal(rng: Rng): number {
  let u = rng.next();
  while (u === 0) u = rng.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.next());
}

/** Gamma(shape, scale) deviate: mean shape·scale, variance shape·scale². */
export function sampleGamma(rng: Rng, shape: number, scale = 1): number {
  if (!(shape > 0) || !Number.isFinite(shape)) invalid('shape', 'must be a finite number > 0', shape);
  if (!(scale > 0) || !Number.isFinite(scale)) invalid('scale', 'must be a finite number > 0', scale);
  if (shape < 1) {
    // Γ(a) = Γ(a+1)·U^(1/a)
    let u = rng.next();
    while (u === 0) u = rng.next();
    return sampleGamma(rng, shape + 1, scale) * Math.pow(u, 1 / shape);
  }
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = sampleNormal(rng);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next();
    const x2 = x * x;
    if (u < 1 - 0.0331 * x2 * x2) return d * v * scale;
    if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v * scale;
  }
}

/** Poisson(mu) deviate. */
export function samplePoisson(rng: Rng, mu: number): number {
  if (!(mu >= 0) || !Number.isFinite(mu)) invalid('mu', 'must be a finite number ≥ 0', mu);
  if (mu === 0) return 0;
  if (mu < 10) {
    // Inversion by sequential search: expected mu + 1 steps.
    let k = 0;
    let p = Math.exp(-mu);
    let c = p;
    const u = rng.next();
    while (u > c && k < 1000) {
      k++;
      p *= mu / k;
      c += p;
    }
    return k;
  }
  // PTRS: transformed rejection with squeeze.
  const slam = Math.sqrt(mu);
  const loglam = Math.log(mu);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invalpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const u = rng.next() - 0.5;
    const v = rng.next();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + mu + 0.43);
    if (us >= 0.07 && v <= vr) return k;
    if (k < 0 || (us < 0.013 && v > us)) continue;
    if (Math.log(v) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -mu + k * loglam - logGamma(k + 1)) return k;
  }
}

/** Negative-binomial deviate with the given mean and dispersion (Var = mean + phi·mean²); phi = 0 is Poisson. */
export function sampleNegBinomial(rng: Rng, mean: number, phi: number): number {
  if (!(mean >= 0) || !Number.isFinite(mean)) invalid('mean', 'must be a finite number ≥ 0', mean);
  if (!(phi >= 0) || !Number.isFinite(phi)) invalid('phi', 'must be a finite number ≥ 0', phi);
  if (mean === 0) return 0;
  if (phi === 0) return samplePoisson(rng, mean);
  const r = 1 / phi;
  return samplePoisson(rng, sampleGamma(rng, r, mean / r));
}

/** Uniform integer in [lo, hi] (inclusive). */
export function sampleInteger(rng: Rng, lo: number, hi: number): number {
  if (!Number.isInteger(lo) || !Number.isInteger(hi) || hi < lo) {
    throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [`integer range must satisfy lo ≤ hi (got ${lo}, ${hi})`]);
  }
  return lo + Math.floor(rng.next() * (hi - lo + 1));
}

function invalid(field: string, reason: string, value: number): never {
  throw new NearcastError('NEARCAST_STATS_ARGUMENT_INVALID', [`${field} ${reason} (got ${String(value)})`]);
}
