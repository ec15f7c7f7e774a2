// Settings of the sensing stage's day-close and publication logic, with defaults and units in one table.

export interface StageSettings {
  /** CloudEvents `source` of every output. */
  readonly eventSource: string;
  readonly demandBasis: 'orders' | 'shipments';
  /** The watermark never runs ahead of a record's arrival by more than this (broker / arrival time + skew), ms. */
  readonly watermarkSkewMs: number;
  /** A day closes by watermark once it passes local midnight ending the day plus this grace, ms. */
  readonly closeGraceMs: number;
  /** Local time on the following day by which a day must be closed when the location names none (HH:MM). */
  readonly defaultDayCloseDeadline: string;
  /**
   * Restatement: late data republishes the last closed plan date (next revision) when the plans' summed absolute
   * change over all series and leads exceeds this share of their summed adjusted quantity…
   */
  readonly restatementThreshold: number;
  /** …and at least this long (log time) has passed since the first late record, so one catch-up is one revision, ms. */
  readonly restatementDebounceMs: number;
  /** A feed-health check calls a location stalled after this long without a record during business hours, ms. */
  readonly feedStallAfterMs: number;
  /** Write changelog entries (off only for in-memory replays such as the backtest). */
  readonly changelog: boolean;
}

export const DEFAULT_STAGE_SETTINGS: StageSettings = Object.freeze({
  eventSource: '/nearcast/sensing',
  demandBasis: 'orders',
  watermarkSkewMs: 5 * 60_000, // 5 min
  closeGraceMs: 30 * 60_000, // 30 min
  defaultDayCloseDeadline: '04:00',
  restatementThreshold: 0.01, // 1 % of the location's adjusted total
  restatementDebounceMs: 15 * 60_000, // 15 min
  feedStallAfterMs: 3 * 3_600_000, // 3 h
  changelog: true,
});
