import { z } from 'zod';
import { NearcastError } from '../errors.ts';

// Every sensing setting, its default and its unit in one table. Validated once into a frozen object; tests use the
// same defaults as production.

const share = z.number().min(0).max(1);
const positive = z.number().positive();

export const sensingSettingsSchema = z
  .object({
    /** What "demand" means: ordered quantity by requested date, or shipped quantity by ship date. */
    demandBasis: z.enum(['orders', 'shipments']).default('orders'),
    /** Complete past weeks that give training rows (weeks). */
    lookbackWeeks: z.number().int().min(4).max(52).default(13),
    /** Highest lead planned (weeks after the current one); leads run 0..maxLead. */
    maxLead: z.number().int().min(1).max(8).default(4),
    /** Half-life of the recency weight of a training row (weeks): weight 0.5^(age / halfLife). */
    halfLifeWeeks: positive.default(4),
    /** Complete weeks behind the recent-ratio feature (weeks). */
    recentWeeks: z.number().int().min(1).max(13).default(8),
    /** Half-life of the recency weight inside the recent ratio (weeks); short, so a sustained shift shows quickly. */
    recentHalfLifeWeeks: positive.default(0.5),
    /**
     * The recent level is measured over a long window (halfLifeWeeks) until the short one (recentHalfLifeWeeks)
     * differs from it by levelSwitchFrom standard errors, and over the short one alone beyond levelSwitchTo (z).
     */
    levelSwitchFrom: z.number().min(0).default(1.5),
    levelSwitchTo: z.number().positive().default(3),
    /** Complete weeks behind each series' typical order-book build-up (weeks). */
    bookProfileWeeks: z.number().int().min(1).max(26).default(6),
    /** Pseudo-demand pulling a series' build-up toward its location's (weeks of its baseline); 0 keeps each series on its own, the location's serving only a series with no week yet. */
    bookProfilePriorWeeks: z.number().min(0).default(0),
    /** Strength of the ridge prior, in weeks' worth of the location's training weight (weeks). */
    ridgeWeeks: z.number().min(0).default(4),
    /**
     * Strength of the prior on the order-book coefficient (weeks of training weight); weaker than the rest, because
     * how much a booked excess carries through (timing noise, customers who pull orders forward) is the location's
     * own habit and its rows show it clearly.
     */
    bookRidgeWeeks: z.number().min(0).default(2),
    /** Largest coefficient the order-book term may take (ratio). */
    bookCoefficientMax: z.number().positive().default(1.2),
    /** Size of term (share of baseline) each pseudo-row of the ridge prior carries (share). */
    ridgeReferenceTerm: positive.default(0.1),
    /** Weighted quantiles at which training ratios are winsorised (shares). */
    winsorLower: share.default(0.025),
    winsorUpper: share.default(0.975),
    /** Largest share of a location's training weight any one series may carry. */
    maxSeriesWeightShare: share.default(0.05),
    /** Fewest usable training rows for a lead to be fitted (rows); fewer → baseline (location-unfit). */
    minRows: z.number().int().min(1).default(24),
    /** Fewest series for the between-series spread to be estimated from the data (series). */
    minSeriesForSpread: z.number().int().min(2).default(8),
    /** Prior probability that the location as a whole has not changed level (share). */
    locationNoChangePrior: share.default(0.9),
    /** Spread of a real location-wide level change, as a ratio to baseline (ratio sd). */
    locationShiftSd: positive.default(0.3),
    /** Defaults and bounds of the series spike-and-slab prior when too few series estimate it. */
    seriesNoChangePrior: share.default(0.95),
    seriesNoChangePriorMin: share.default(0.95),
    seriesShiftSd: positive.default(0.25),
    seriesShiftSdMin: positive.default(0.03),
    seriesShiftSdMax: positive.default(1),
    /** Smallest week-to-week noise assumed for a ratio (relative sd per week). */
    minRatioNoise: positive.default(0.01),
    /** Factor per week of lead applied to level (non-order-book) adjustments (share per week). */
    leadDecayPerWeek: share.default(0.99),
    /** Ratio guardrails around the baseline (ratios). */
    ratioLower: z.number().min(0).max(1).default(0.5),
    ratioUpper: z.number().min(1).default(2),
    /** Absolute slack around a baseline near zero (units per week). */
    absoluteSlack: z.number().min(0).default(5),
    /** Prior survival of booked lines and its strength (share; weeks of the location's booked volume). */
    survivalPrior: share.default(0.97),
    survivalPriorWeeks: z.number().min(0).default(1),
    /** A line is large when above this share of its week's baseline and this multiple of the customer's usual line. */
    largeLineWeekShare: positive.default(0.5),
    largeLineFactor: positive.default(5),
    /** Earlier lines needed to judge what is usual for a customer (lines). */
    largeLineMinHistory: z.number().int().min(1).default(3),
    /** Shipments basis: a day is censored when shipments fall below this share of the orders due (share). */
    censorShortShare: share.default(0.8),
    /**
     * Shipments basis: a day's censoring is judged from what is known by the end of the day this many days later, and
     * from then on never changes, so a plan made then and a recompute weeks later see the same censored days (days).
     * One day is common practice: shipments are booked by the next morning.
     */
    censorGraceDays: z.number().int().min(0).max(7).default(1),
    /** Capacity of a reduced holiday relative to a normal day (share). */
    reducedDayShare: share.default(0.5),
    /** Below this volume a series is small: exact count tests, baseline passed through (units per business day). */
    smallSeriesPerDay: z.number().min(0).default(1),
    /** Two-sided significance for a small series to move off its baseline (probability). */
    smallSeriesAlpha: z.number().gt(0).lt(1).default(0.01),
    /** Weeks compared by the small-series exact test (weeks). */
    smallSeriesWeeks: z.number().int().min(1).default(8),
    /** Strength of the baseline as gamma prior for small and new series (weeks of baseline). */
    gammaPriorWeeks: z.number().min(0).default(2),
    /** A series with fewer complete weeks of history than this is new (weeks). */
    newSeriesWeeks: z.number().int().min(0).default(4),
    /** Weeks behind the run-rate of a series without baseline (weeks). */
    runRateWeeks: z.number().int().min(1).default(6),
    /** Quantile levels published (probabilities), ascending. */
    quantiles: z.array(z.number().gt(0).lt(1)).min(1).default([0.1, 0.5, 0.9]),
    /** Correlation of the over-Poisson errors of different leads, for cumulative quantiles (correlation). */
    leadErrorCorrelation: z.number().min(0).max(1).default(0.5),
    /** Fewest rows for a volume band to estimate its own dispersion; thinner bands borrow the nearest (rows). */
    dispersionMinRows: z.number().int().min(1).default(30),
    /** Variance of the predictive distribution relative to the fit's in-sample residual variance (factor). */
    predictiveVarianceFactor: z.number().min(1).default(1.1),
    /** Dispersion used before anything could be estimated (Var = mean + phi·mean²). */
    dispersionDefault: z.number().min(0).default(0.05),
    /** A plan moved when any lead changed by more than both thresholds (units per week; share). */
    materialityUnits: z.number().min(0).default(1),
    materialityShare: share.default(0.05),
  })
  .superRefine((s, ctx) => {
    if (s.winsorLower >= s.winsorUpper) ctx.addIssue({ code: 'custom', path: ['winsorUpper'], message: 'must be above winsorLower' });
    for (let i = 1; i < s.quantiles.length; i++) {
      if (s.quantiles[i]! <= s.quantiles[i - 1]!) ctx.addIssue({ code: 'custom', path: ['quantiles', i], message: 'must be ascending' });
    }
    if (s.levelSwitchTo <= s.levelSwitchFrom) ctx.addIssue({ code: 'custom', path: ['levelSwitchTo'], message: 'must be above levelSwitchFrom' });
    if (s.seriesShiftSdMin > s.seriesShiftSdMax) ctx.addIssue({ code: 'custom', path: ['seriesShiftSdMax'], message: 'must be at least seriesShiftSdMin' });
  });

export type SensingSettings = Readonly<z.output<typeof sensingSettingsSchema>>;
export type SensingSettingsInput = z.input<typeof sensingSettingsSchema>;

/** Defaults overlaid with the given settings, validated and frozen; NEARCAST_CONFIG_INVALID names each bad field. */
export function sensingSettings(input: SensingSettingsInput = {}): SensingSettings {
  const parsed = sensingSettingsSchema.safeParse(input);
  if (!parsed.success) {
    throw new NearcastError(
      'NEARCAST_CONFIG_INVALID',
      parsed.error.issues.map((i) => `sensing.${i.path.map(String).join('.')}: ${i.message}`),
    );
  }
  const s = parsed.data;
  Object.freeze(s.quantiles);
  return Object.freeze(s);
}

export const DEFAULT_SENSING_SETTINGS: SensingSettings = sensingSettings();

/** Weeks of history the state must keep so that the oldest training row still has its features. */
export function retentionWeeks(s: SensingSettings): number {
  return s.lookbackWeeks + s.maxLead + Math.max(s.recentWeeks, s.bookProfileWeeks, s.smallSeriesWeeks, s.runRateWeeks) + 1;
}
