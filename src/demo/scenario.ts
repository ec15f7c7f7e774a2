// The demo's story, as data: sixteen weeks of history with four things a planner should see handled.

export interface Scenario {
  readonly seed: number;
  /** Monday of the first history week. */
  readonly start: string;
  readonly weeks: number;
  /** Nothing after this instant is in the history (the "now" of the demo); the replay clock runs up to it. */
  readonly cutAt: string;
  /** Monthly planning cycle: a baseline version is published before these weeks (index from start). */
  readonly baselineWeeks: readonly number[];
  readonly baselineHorizonWeeks: number;
  /** A heat wave lifts weather-sensitive items at one centre from `from` on (still going at the cut). */
  readonly heatWave: { readonly location: string; readonly from: string; readonly rampDays: number; readonly lift: number };
  /** One customer stocks up on some items in the week before a price change, then orders less. */
  readonly stockUp: {
    readonly location: string;
    readonly customer: string;
    readonly items: readonly string[];
    readonly orderedFrom: string;
    readonly orderedTo: string;
    readonly requestedFrom: string;
    readonly requestedTo: string;
    /** Extra units as a multiple of the customer's usual week of the item. */
    readonly extraWeeks: number;
    readonly priceChangeOn: string;
    /** Share of the usual orders the customer still places in the weeks after the price change. */
    readonly afterShare: number;
  };
  /** A location's feed stops at `from`; everything it held arrives at `catchUpAt` (late data). */
  readonly feedStall: { readonly location: string; readonly from: string; readonly catchUpAt: string };
}

export const DEMO_SCENARIO: Scenario = {
  seed: 20260406,
  start: '2026-04-06',
  weeks: 16,
  cutAt: '2026-07-27T04:30:00Z',
  baselineWeeks: [0, 4, 8, 12],
  baselineHorizonWeeks: 26,
  heatWave: { location: 'DC-SOUTH', from: '2026-07-08', rampDays: 4, lift: 0.65 },
  stockUp: {
    location: 'DC-NORTH',
    customer: 'NORDMARKT',
    items: ['COLA-330', 'COLA-1L', 'COLA-ZERO-330', 'COLA-ZERO-1L'],
    orderedFrom: '2026-07-14',
    orderedTo: '2026-07-16',
    requestedFrom: '2026-07-20',
    requestedTo: '2026-07-24',
    extraWeeks: 2.5,
    priceChangeOn: '2026-07-27',
    afterShare: 0.35,
  },
  feedStall: { location: 'DC-COAST', from: '2026-07-21T10:00:00+01:00', catchUpAt: '2026-07-22T11:00:00+01:00' },
};
