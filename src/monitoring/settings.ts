import { z } from 'zod';
import { NearcastError } from '../errors.ts';

// Every monitoring parameter, its default, its unit and where the default comes from. "common practice" marks a
// rule of thumb; "(recalled from memory)" a value not checked against a located copy of its source.

const share = z.number().min(0).max(1);
const positive = z.number().positive();
const count = z.number().int().min(1);

const pointSchema = z
  .object({
    /** Two-sided tail probability of the exact limits: 0.0027 is the 3σ Shewhart convention (e-Handbook 6.3.2). */
    alpha: z.number().gt(0).lt(0.5).default(0.0027),
    /** Benjamini–Hochberg false-discovery level across a location's series per day (BH 1995 use 0.05; common practice). */
    fdrLevel: z.number().gt(0).lt(1).default(0.05),
    /** Hysteresis: a point-rule episode counts a day as in control only when its two-sided p exceeds this (common practice). */
    inControlAlpha: z.number().gt(0).lt(1).default(0.05),
    /** Below this expected intake a day is not tested (nothing meaningful to compare against). */
    minExpected: z.number().min(0).default(0.05),
  })
  .prefault({});

const shiftSchema = z
  .object({
    statistic: z.enum(['cusum', 'ewma']).default('cusum'),
    /** Tabular CUSUM reference value and decision interval in σ units: k = 0.5 with h = 4.77, the design whose
     * in-control ARL (≈ 370 per side) matches a 3σ Shewhart chart (Montgomery, Introduction to Statistical Quality
     * Control, §9.1; recalled from memory). h = 5 (ARL ≈ 465) is the other common choice. */
    k: z.number().min(0).default(0.5),
    h: positive.default(4.77),
    /** Each day's score is winsorised here before it enters the shift statistic (and the level it re-centres on), so
     * one extreme day is the spike rule's business and a shift needs at least two (winsorised CUSUM; common practice). */
    clipZ: positive.default(3),
    /** EWMA alternative: λ = 0.2 and L = 3 (common practice; Montgomery recommends 0.05 ≤ λ ≤ 0.25). */
    lambda: z.number().gt(0).max(1).default(0.2),
    L: positive.default(3),
  })
  .prefault({});

const noiseSchema = z
  .object({
    // Dispersion is pooled by the volume bands of src/stats/volume-band.ts, the same bands sensing pools by.
    /** Dispersion φ of Var = μ + φμ² assumed before data arrive, and its weight in series-days (our choice: mild). */
    priorDispersion: z.number().min(0).max(2).default(0.02),
    priorWeight: positive.default(30),
    /** A series' own dispersion is shrunk toward its band's, which counts as this many of its days (empirical Bayes; our choice). */
    seriesShrinkDays: positive.default(30),
    /** Pooled estimates forget old days with this half-life in days (our choice: about a quarter). */
    halfLifeDays: positive.default(60),
    maxDispersion: positive.default(1),
    /** Standardised residuals are winsorised here before they update noise estimates (common practice: 4σ). */
    winsorZ: positive.default(4),
    /** Long-run variance: scores summed over blocks of this many monitored days (two business weeks: a weekly
     * block missed half the correlation of a level that wanders over a week or two in simulation; our choice). */
    blockDays: z.number().int().min(2).max(30).default(10),
    priorBlocks: positive.default(20),
    maxVarianceFactor: z.number().min(1).default(4),
  })
  .prefault({});

const lifecycleSchema = z
  .object({
    /** Consecutive in-control days that auto-resolve an episode (common practice). */
    resolveAfterDays: count.default(5),
    /** A signal within this many days of an auto-resolution re-opens the same alert (issue: "a few days"). */
    reopenWithinDays: z.number().int().min(0).default(3),
    maxSnoozeDays: count.default(7),
    /** Resolved alerts are kept this long for re-opening and late commands, then dropped from state. */
    keepResolvedDays: count.default(14),
  })
  .prefault({});

const floorSchema = z
  .object({
    /** Smallest deviation worth an alert, in units (a day for point rules, `valueHorizonDays` for shifts). */
    minUnits: z.number().min(0).default(5),
    /** ...and as a share of the expectation, used where no unit price is known. */
    minShare: share.default(0.15),
    /** Smallest value at risk worth an alert where a unit price is known, in the price's currency. */
    minValue: z.number().min(0).default(100),
    /** Days a shift's deviation is counted over for its units and value at risk (one business week). */
    valueHorizonDays: count.default(5),
  })
  .prefault({});

const severitySchema = z
  .object({
    /** Relative deviation |observed − expected| / expected for medium and high (common practice). */
    mediumShare: positive.default(0.5),
    highShare: positive.default(1),
    /** Value at risk for medium and high where a price is known (currency units; deployment-specific). */
    mediumValue: z.number().min(0).default(1_000),
    highValue: z.number().min(0).default(10_000),
  })
  .prefault({});

const groupSchema = z
  .object({
    /** Series firing the same way within this many days form one group (issue: two or three days). */
    windowDays: z.number().int().min(1).max(7).default(3),
    minLocationMembers: z.number().int().min(2).default(4),
    minCustomerMembers: z.number().int().min(2).default(3),
    minItemLocations: z.number().int().min(2).default(3),
    /** A customer explains a series' deviation when it carries at least this share of it. */
    customerShare: share.default(0.5),
    /** Customer intake is tracked with this exponential smoothing weight per day (common practice). */
    customerSmoothing: z.number().gt(0).lt(1).default(0.1),
    maxCustomersPerSeries: count.default(20),
  })
  .prefault({});

const budgetSchema = z
  .object({
    /** Pages per location and day; the rest go to the daily digest (common practice: a handful). */
    pagesPerLocationDay: z.number().int().min(0).default(5),
  })
  .prefault({});

const feedSchema = z
  .object({
    /** Business-hours minutes without any record that count as a stalled feed (the runtime's 3 h; common practice). */
    stallMinutes: positive.default(180),
    /** With a known record rate, the gap must also be this improbable under Poisson arrivals. */
    silenceProbability: z.number().gt(0).lt(1).default(0.001),
  })
  .prefault({});

const divergenceSchema = z
  .object({
    /** |adjusted / baseline − 1| that counts as far from the baseline (our choice). */
    minRatio: positive.default(0.25),
    /** Hysteresis: the episode ends only once the gap falls below minRatio × this. */
    resolveFraction: z.number().gt(0).lt(1).default(0.8),
  })
  .prefault({});

const replanSchema = z
  .object({
    /** The fixed lead (weeks ahead) the baseline is scored at; completed weeks at other leads are ignored (our choice). */
    lead: z.number().int().min(0).max(12).default(1),
    /** Trigg's smoothing constant and the |T| limit for it: β = 0.1, 0.51 (Trigg 1964, via tracking-signal-example.json). */
    beta: z.number().gt(0).lt(1).default(0.1),
    limit: z.number().gt(0).lt(1).default(0.51),
    /** Weeks since the last re-plan before a series may be listed (common practice). */
    minWeeks: count.default(4),
    /** Persistent adjustment: |adjusted / baseline − 1| at least this for this many weeks in a row (common practice). */
    adjustShare: positive.default(0.1),
    adjustWeeks: count.default(4),
    historyWeeks: count.default(8),
  })
  .prefault({});

export const monitoringSettingsSchema = z
  .object({
    point: pointSchema,
    shift: shiftSchema,
    noise: noiseSchema,
    lifecycle: lifecycleSchema,
    floor: floorSchema,
    severity: severitySchema,
    group: groupSchema,
    budget: budgetSchema,
    feed: feedSchema,
    divergence: divergenceSchema,
    replan: replanSchema,
  })
  .strict()
  .superRefine((s, ctx) => {
    if (s.severity.highShare < s.severity.mediumShare) {
      ctx.addIssue({ code: 'custom', path: ['severity', 'highShare'], message: 'must not be below mediumShare' });
    }
    if (s.severity.highValue < s.severity.mediumValue) {
      ctx.addIssue({ code: 'custom', path: ['severity', 'highValue'], message: 'must not be below mediumValue' });
    }
  });

export type MonitoringSettings = Readonly<z.infer<typeof monitoringSettingsSchema>>;
export type MonitoringSettingsInput = z.input<typeof monitoringSettingsSchema>;

/** Validates overrides over the defaults into a frozen settings object; names every bad field. */
export function monitoringSettings(overrides: MonitoringSettingsInput = {}): MonitoringSettings {
  const parsed = monitoringSettingsSchema.safeParse(overrides);
  if (!parsed.success) {
    throw new NearcastError(
      'NEARCAST_CONFIG_INVALID',
      parsed.error.issues.map((i) => `monitoring.${i.path.map(String).join('.')}: ${i.message}`),
    );
  }
  return deepFreeze(parsed.data);
}

export const DEFAULT_MONITORING_SETTINGS: MonitoringSettings = monitoringSettings();

function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object') {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}
