import type { Location } from '../contracts/location.ts';

// The runtime's own part of a location's state (next to the sensing/monitoring model): where its day-close
// clock stands and what was last published. JSON-serialisable; saved in the location's changelog snapshot.

export interface LastClose {
  readonly planDate: string;
  readonly revision: number;
  readonly closeMs: number;
  /** Adjusted quantity per item and lead as published, to measure a restatement's size. */
  readonly adjusted: Readonly<Record<string, readonly number[]>>;
}

export interface LocationRuntimeState {
  readonly location: string;
  master: Location;
  /** Event-time watermark (epoch ms): max over facts of min(event time, arrival + skew). */
  watermarkMs: number | null;
  /** Next local date to close; null until the first fact (order line or shipment) arrives. */
  nextDate: string | null;
  lastClose: LastClose | null;
  /** Arrival of the first late fact not yet reflected in a publication (debounce start). */
  lateSinceMs: number | null;
  /** Arrival of the last order line or shipment (feed health). */
  lastFeedArrivalMs: number | null;
  /** Latest arrival of any record of this location (the location's log time). */
  logMs: number;
  /** Local dates on which a feed-health check found the feed stalled (only dates not closed yet are kept). */
  stalledDates: string[];
}

export function newRuntimeState(master: Location, arrivalMs: number): LocationRuntimeState {
  return {
    location: master.location,
    master,
    watermarkMs: null,
    nextDate: null,
    lastClose: null,
    lateSinceMs: null,
    lastFeedArrivalMs: null,
    logMs: arrivalMs,
    stalledDates: [],
  };
}
