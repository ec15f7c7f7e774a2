// Special functions behind the count distributions. Densities use Loader's saddle-point form
// (stirlerr + bd0), so a Poisson or negative-binomial probability at a mean of 1e6 keeps ~14 digits where
// exp(k·ln μ − μ − lnΓ(k+1)) would lose seven to cancellation between terms of size 1e7.
// Loader, C. (2000) "Fast and accurate computation of binomial probabilities" (recalled from memory).

const LN_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);
const LN_2PI = Math.log(2 * Math.PI);

// Lanczos approximation, g = 7, n = 9 (coefficients as commonly published; recalled from memory and checked in
// the tests against factorials and Γ(1/2) = √π). Relative error about 1e-15 for x ≥ 0.5.
const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln|Γ(x)|; +Infinity at the poles 0, −1, −2, … */
export function logGamma(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x === Infinity) return Infinity;
  if (x <= 0 && Number.isInteger(x)) return Infinity;
  if (x === 1 || x === 2) return 0;
  if (x < 0.5) {
    // Reflection: Γ(x)Γ(1−x) = π / sin(πx).
    return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  }
  if (x >= 15) return stirlingLogGamma(x);
  const z = x - 1;
  let a = LANCZOS[0]!;
  const t = z + LANCZOS_G + 0.5;
  for (let i = 1; i < LANCZOS.length; i++) a += LANCZOS[i]! / (z + i);
  return LN_SQRT_2PI + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

function stirlingLogGamma(x: number): number {
  return (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI + stirlingSeries(x);
}

// Asymptotic series of lnΓ(x) − Stirling: 1/(12x) − 1/(360x³) + 1/(1260x⁵) − 1/(1680x⁷) + 1/(1188x⁹) − …
// At x ≥ 15 the first omitted term is below 1e-15 of the result.
function stirlingSeries(x: number): number {
  const x2 = 1 / (x * x);
  return (1 / 12 - x2 * (1 / 360 - x2 * (1 / 1260 - x2 * (1 / 1680 - x2 * (1 / 1188 - x2 * (691 / 360360)))))) / x;
}

/** Stirling's error: lnΓ(n+1) − [(n+½)ln n − n + ln√(2π)], for n > 0 (real). */
export function stirlerr(n: number): number {
  if (n >= 15) return stirlingSeries(n);
  // Below 15 the terms are small enough that direct evaluation keeps ~14 significant digits of the result.
  return logGamma(n + 1) - (n + 0.5) * Math.log(n) + n - LN_SQRT_2PI;
}

/** Deviance term x·ln(x/m) + m − x, computed without cancellation when x ≈ m. */
export function bd0(x: number, m: number): number {
  if (x === 0) return m;
  const d = x - m;
  if (Math.abs(d) < 0.1 * (x + m)) {
    const v = d / (x + m);
    const v2 = v * v;
    let s = d * v;
    let ej = 2 * x * v;
    for (let j = 1; j < 1000; j++) {
      ej *= v2;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

/** mᵡe⁻ᵐ/Γ(x+1) for real x ≥ 0, m ≥ 0: the Poisson density extended to real x. */
export function poissonDensityRaw(x: number, m: number): number {
  if (m === 0) return x === 0 ? 1 : 0;
  if (x === 0) return Math.exp(-m);
  if (!Number.isFinite(m)) return 0;
  return Math.exp(-stirlerr(x) - bd0(x, m)) / Math.sqrt(2 * Math.PI * x);
}

/**
 * C(x+y, x)·pˣ·qʸ for real x, y ≥ 0, with q = 1 − p passed separately to keep its precision. The two counts are
 * passed apart (not as n and x) because n − x loses the small one's digits when the other is huge (phi → 0).
 */
export function binomialDensityRaw(x: number, y: number, p: number, q: number): number {
  if (x < 0 || y < 0) return 0;
  if (p === 0) return x === 0 ? 1 : 0;
  if (q === 0) return y === 0 ? 1 : 0;
  const n = x + y;
  if (x === 0) return y === 0 ? 1 : Math.exp(p < 0.1 ? y * Math.log1p(-p) : y * Math.log(q));
  if (y === 0) return Math.exp(q < 0.1 ? x * Math.log1p(-q) : x * Math.log(p));
  const lc = stirlerr(n) - stirlerr(x) - stirlerr(y) - bd0(x, n * p) - bd0(y, n * q);
  const lf = LN_2PI + Math.log(x) + Math.log(y) - Math.log(n);
  return Math.exp(lc - 0.5 * lf);
}

const EPS = 1e-16;
const TINY = 1e-300;
const MAX_ITER = 100_000;

export interface Tails {
  /** Lower regularized value (P for gamma, I for beta). */
  readonly lower: number;
  /** Upper regularized value (Q = 1 − P, 1 − I), computed directly where it is the small one. */
  readonly upper: number;
}

/**
 * Regularized incomplete gamma P(a, x) and Q(a, x), a > 0, x ≥ 0. Series below x = a + 1, Legendre's continued
 * fraction above (modified Lentz); each tail is computed directly on its own side so the small one keeps its
 * relative precision. Iterations grow like √a.
 */
export function regularizedGamma(a: number, x: number): Tails {
  if (x <= 0) return { lower: 0, upper: 1 };
  if (x === Infinity) return { lower: 1, upper: 0 };
  if (x < a + 1) {
    const lower = gammaSeriesLower(a, x);
    return { lower, upper: 1 - lower };
  }
  const upper = gammaFractionUpper(a, x);
  return { lower: 1 - upper, upper };
}

// The number-only forms below are what the quantile searches call: an object per tail evaluation was most of a
// close's short-lived garbage. Each side is computed directly where it is the small one, the other as its complement.

/** Q(a, x) when `upper`, else P(a, x); each computed as regularizedGamma's field of that name. */
export function regularizedGammaSide(a: number, x: number, upper: boolean): number {
  if (x <= 0) return upper ? 1 : 0;
  if (x === Infinity) return upper ? 0 : 1;
  if (x < a + 1) {
    const lower = gammaSeriesLower(a, x);
    return upper ? 1 - lower : lower;
  }
  const q = gammaFractionUpper(a, x);
  return upper ? q : 1 - q;
}

// P(a,x) = xᵃe⁻ˣ/Γ(a+1) · Σ xⁿ / ((a+1)…(a+n))
function gammaSeriesLower(a: number, x: number): number {
  let term = 1;
  let sum = 1;
  for (let n = 1; n < MAX_ITER; n++) {
    term *= x / (a + n);
    sum += term;
    if (term < sum * EPS) break;
  }
  return Math.min(1, poissonDensityRaw(a, x) * sum);
}

// Q(a,x) = xᵃe⁻ˣ/Γ(a) · 1/(x+1−a− 1·(1−a)/(x+3−a− 2·(2−a)/(x+5−a− …)))
function gammaFractionUpper(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITER; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.min(1, a * poissonDensityRaw(a, x) * h);
}

/**
 * Regularized incomplete beta I_x(a, b) and 1 − I_x(a, b), a, b > 0, with y = 1 − x passed separately so a
 * probability close to 1 keeps its complement's digits. Continued fraction (modified Lentz) on whichever side
 * converges; the other tail by symmetry.
 */
export function regularizedBeta(x: number, y: number, a: number, b: number): Tails {
  if (x <= 0) return { lower: 0, upper: 1 };
  if (y <= 0) return { lower: 1, upper: 0 };
  if (x < (a + 1) / (a + b + 2)) {
    const lower = betaLowerDirect(x, y, a, b);
    return { lower, upper: 1 - lower };
  }
  const upper = betaLowerDirect(y, x, b, a);
  return { lower: 1 - upper, upper };
}

function betaLowerDirect(x: number, y: number, a: number, b: number): number {
  return Math.min(1, betaPrefactor(x, y, a, b) * betaContinuedFraction(x, a, b));
}

/** 1 − I_x(a, b) when `upper`, else I_x(a, b); each computed as regularizedBeta's field of that name. */
export function regularizedBetaSide(x: number, y: number, a: number, b: number, upper: boolean): number {
  if (x <= 0) return upper ? 1 : 0;
  if (y <= 0) return upper ? 0 : 1;
  if (x < (a + 1) / (a + b + 2)) {
    const lower = betaLowerDirect(x, y, a, b);
    return upper ? 1 - lower : lower;
  }
  const up = betaLowerDirect(y, x, b, a);
  return upper ? up : 1 - up;
}

// xᵃ yᵇ / (a·B(a,b)) = C(a+b, a)·xᵃyᵇ · b/(a+b), in the saddle-point form.
function betaPrefactor(x: number, y: number, a: number, b: number): number {
  return binomialDensityRaw(a, b, x, y) * (b / (a + b));
}

function betaContinuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m < MAX_ITER; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return h;
}

/**
 * Standard normal quantile, rational approximation with |error| < 4.5e-4 (Abramowitz & Stegun 26.2.23,
 * coefficients recalled from memory). Used only as a starting point for exact discrete searches.
 */
export function approxNormalQuantile(p: number): number {
  if (p <= 0) return -Infinity;
  if (p >= 1) return Infinity;
  const tail = p < 0.5 ? p : 1 - p;
  const t = Math.sqrt(-2 * Math.log(tail));
  const z = t - (2.515517 + t * (0.802853 + t * 0.010328)) / (1 + t * (1.432788 + t * (0.189269 + t * 0.001308)));
  return p < 0.5 ? -z : z;
}
