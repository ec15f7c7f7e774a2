import type { AccuracySummary } from '../contracts/accuracy-summary.ts';
import type { Alert } from '../contracts/alert.ts';
import type { Location } from '../contracts/location.ts';
import type { Manifest } from '../contracts/manifest.ts';
import type { Plan } from '../contracts/plan.ts';
import type { ReplanEntry } from '../contracts/replan-entry.ts';
import type { ErrorCode } from '../errors.ts';
import type { EventLogRecordOf } from './event-log-record.ts';
import type { AlertCommand } from './internal-records.ts';

// What the sensing stage needs from the pure core for one location: the sensing engine (state, apply, sense), the
// monitoring of a closed day, alert commands and the self-check scores. The stage is written against this port; an
// adapter (core-location-model.ts) binds it to src/sensing, src/monitoring and src/accuracy.

export type ApplyOutcome =
  | { readonly status: 'applied' | 'duplicate' | 'superseded' }
  | { readonly status: 'rejected'; readonly code: ErrorCode; readonly message: string; readonly path?: string };

/** Facts the model applies; it should treat a record as known from max(its own time, `arrivalMs`) (late data). */
export type FactRecord =
  | EventLogRecordOf<'order-line'>
  | EventLogRecordOf<'shipment'>
  | EventLogRecordOf<'baseline-version'>
  | EventLogRecordOf<'day-closed'>;

export interface SenseAsOf {
  readonly planDate: string;
  /** Everything known up to this instant (epoch ms) may be used. */
  readonly knowledgeMs: number;
}

export interface SensedDay {
  /** One plan per active series; `revision` is set by the stage. */
  readonly plans: readonly Plan[];
  readonly model: Manifest['model'];
}

/** How a day came to be closed, and what the runtime knows about the location's feed that day. */
export interface DayFacts {
  readonly planDate: string;
  readonly closedBy: 'day-closed' | 'watermark' | 'deadline';
  /** The location named its own day-close deadline (a deadline close then means the source failed to close). */
  readonly ownDeadline: boolean;
  /** A feed-health check found the feed silent during business hours on this day. */
  readonly feedStalled: boolean;
  readonly closeMs: number;
  /** Arrival of the location's last order line or shipment, null if none ever arrived. */
  readonly lastRecordMs: number | null;
}

/** A feed-health check between closes (written into the log by the clock). */
export interface FeedCheckFacts {
  readonly atMs: number;
  readonly lastRecordMs: number | null;
  readonly isBusinessDay: boolean;
}

export interface ClosedDayOutputs {
  readonly alerts: readonly Alert[];
  readonly replan: readonly ReplanEntry[];
  readonly accuracy: readonly AccuracySummary[];
}

export interface LocationModel {
  /** Master data changed (applies from now on). */
  setMaster(location: Location): void;
  apply(record: FactRecord): ApplyOutcome;
  /** Pure with respect to the model: computing does not change it (a restatement may be computed and dropped). */
  sense(asOf: SenseAsOf): SensedDay;
  /** The stage published `day` (first close or restatement of its plan date) with `revision`. */
  published(day: SensedDay, asOf: SenseAsOf, revision: number): void;
  /** Monitoring and self-check of a closed business day, after its plans were published. */
  closeDay(day: SensedDay, facts: DayFacts): ClosedDayOutputs;
  /** A feed-health check; returns the alert changes it caused (a feed-stalled alert opened). Optional. */
  feedCheck?(check: FeedCheckFacts): { readonly alerts: readonly Alert[] };
  /** A planner's command; returns the alert state changes it caused (none when it changes nothing). */
  command(command: AlertCommand): { readonly alerts: readonly Alert[]; readonly refused?: { readonly code: ErrorCode; readonly message: string } };
  /** JSON-serialisable. */
  snapshot(): unknown;
  /**
   * Optional, for large locations: the state in parts, so a batch writes only what changed. `base` is always
   * written; `parts` holds the parts changed since the previous call (null = the part is gone). Part keys must not
   * contain `|`.
   */
  snapshotParts?(): { readonly base: unknown; readonly parts: ReadonlyMap<string, unknown> };
}

export interface LocationModelFactory {
  create(location: Location): LocationModel;
  restore(snapshot: unknown): LocationModel;
  /** Rebuilds a model saved with snapshotParts (every part's latest value). */
  restoreParts?(base: unknown, parts: ReadonlyMap<string, unknown>): LocationModel;
}
