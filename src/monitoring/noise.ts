import { addDispersionObservation, dispersionEstimate, emptyDispersion, type DispersionAccumulator } from '../stats/dispersion.ts';
import { VOLUME_BANDS, volumeBandOf, type VolumeBand } from '../stats/volume-band.ts';
import type { MonitoringSettings } from './settings.ts';

// Count-data noise pooled by volume band at one location: the dispersion φ of Var = μ + φμ² (method of moments,
// src/stats/dispersion.ts) and a long-run variance factor for the shift statistic. Day-to-day noise alone
// understates how far a sum of days wanders when days are correlated (a customer ordering in waves), which is what
// a CUSUM accumulates; so blocks of consecutive daily scores are summed and S²/n (1 for independent days) is pooled
// too. Both forget with a half-life so a location's noise may change with the seasons.

export interface BandNoise {
  dispersion: DispersionAccumulator;
  /** Blocks seen and Σ S²/n over them (decayed). */
  blocks: number;
  sumBlockRatio: number;
}

export type NoisePool = Record<VolumeBand, BandNoise>;

export function emptyNoisePool(): NoisePool {
  const pool = {} as NoisePool;
  for (const band of VOLUME_BANDS) pool[band] = { dispersion: emptyDispersion(), blocks: 0, sumBlockRatio: 0 };
  return pool;
}

type NoiseSettings = MonitoringSettings['noise'];

export function bandOf(expectedPerDay: number): VolumeBand {
  return volumeBandOf(expectedPerDay);
}

/**
 * φ for a band: the pooled estimate blended with a prior worth `priorWeight` typical series-days; the prior is
 * the configured one, or a dispersion known elsewhere (sensing's for the band).
 */
export function dispersionOf(pool: NoisePool, band: VolumeBand, s: NoiseSettings, prior: number = s.priorDispersion): number {
  return shrunk(pool[band].dispersion, prior, s.priorWeight, s.maxDispersion);
}

/**
 * φ for one series: its own days shrunk toward its band's φ, the band counting as `seriesShrinkDays` of its days.
 * Pooling alone would give a series twice as variable as its band a σ too small, and most of the band's false
 * alarms; its own estimate alone is too noisy for its first weeks.
 */
export function seriesDispersionOf(own: DispersionAccumulator, bandPhi: number, s: NoiseSettings): number {
  return shrunk(own, bandPhi, s.seriesShrinkDays, s.maxDispersion);
}

function shrunk(acc: DispersionAccumulator, prior: number, priorDays: number, maxPhi: number): number {
  if (acc.n <= 0 || acc.sumMeanSquared <= 0) return prior;
  const priorMass = priorDays * (acc.sumMeanSquared / acc.n);
  const blended = { n: acc.n + priorDays, sumExcess: acc.sumExcess + prior * priorMass, sumMeanSquared: acc.sumMeanSquared + priorMass };
  return dispersionEstimate(blended, { maxPhi });
}

/** Long-run variance factor for a band, at least 1 (negative correlation is not relied on), at most the cap. */
export function varianceFactorOf(pool: NoisePool, band: VolumeBand, s: NoiseSettings): number {
  const b = pool[band];
  const f = (s.priorBlocks + b.sumBlockRatio) / (s.priorBlocks + b.blocks);
  return Math.min(s.maxVarianceFactor, Math.max(1, f));
}

/**
 * Adds one in-control day (counts in the series' own unit) to the band and to the series' own accumulator,
 * winsorised so one odd day cannot set the noise.
 */
export function addNoiseDay(pool: NoisePool, band: VolumeBand, own: DispersionAccumulator, observed: number, expected: number, phi: number, s: NoiseSettings): void {
  if (expected <= 0) return;
  const sd = Math.sqrt(expected + phi * expected * expected);
  const d = Math.max(-s.winsorZ * sd, Math.min(s.winsorZ * sd, observed - expected));
  // Weights make each day's (d² − μ)/μ² count by its precision: about (μ / (1 + φμ))².
  const w = 1 / (1 + phi * expected) ** 2;
  addDispersionObservation(pool[band].dispersion, Math.max(0, expected + d), expected, w);
  addDispersionObservation(own, Math.max(0, expected + d), expected, w);
}

export function decayAccumulator(acc: DispersionAccumulator, days: number, s: NoiseSettings): void {
  if (days <= 0) return;
  const f = 0.5 ** (days / s.halfLifeDays);
  acc.n *= f;
  acc.sumExcess *= f;
  acc.sumMeanSquared *= f;
}

export function addNoiseBlock(pool: NoisePool, band: VolumeBand, scoreSum: number, days: number, s: NoiseSettings): void {
  if (days <= 0) return;
  pool[band].blocks += 1;
  pool[band].sumBlockRatio += Math.min(s.winsorZ * s.winsorZ, (scoreSum * scoreSum) / days);
}

export function decayNoisePool(pool: NoisePool, days: number, s: NoiseSettings): void {
  if (days <= 0) return;
  const f = 0.5 ** (days / s.halfLifeDays);
  for (const band of VOLUME_BANDS) {
    const b = pool[band];
    decayAccumulator(b.dispersion, days, s);
    b.blocks *= f;
    b.sumBlockRatio *= f;
  }
}
