import type { Guardrail } from '../contracts/plan.ts';
import type { SensingSettings } from './settings.ts';

export interface Bounds {
  readonly lower: number;
  readonly upper: number;
  readonly lowerKind: Guardrail;
  readonly upperKind: Guardrail;
}

/**
 * Bounds around a baseline: ratio bounds, widened by an absolute slack where the baseline is near zero (a ratio
 * band around 0.2 units would forbid sensing real demand on a tiny baseline).
 */
export function guardrailBounds(baseline: number, s: SensingSettings): Bounds {
  const ratioUp = baseline * s.ratioUpper;
  const absUp = baseline + s.absoluteSlack;
  const ratioLo = baseline * s.ratioLower;
  const absLo = Math.max(0, baseline - s.absoluteSlack);
  return {
    upper: Math.max(ratioUp, absUp),
    upperKind: ratioUp >= absUp ? 'ratio-upper' : 'absolute-upper',
    lower: Math.min(ratioLo, absLo),
    lowerKind: ratioLo <= absLo ? 'ratio-lower' : 'absolute-lower',
  };
}

export interface Guarded {
  readonly value: number;
  readonly guardrail: Guardrail | null;
}

/**
 * Clamps a raw quantity into the bounds, then raises it to the floor (the order book expected to survive): booked
 * demand is real, so the floor wins over the upper bound.
 */
export function applyGuardrails(raw: number, bounds: Bounds | null, floor: number): Guarded {
  let value = raw;
  let guardrail: Guardrail | null = null;
  if (bounds) {
    if (value > bounds.upper) {
      value = bounds.upper;
      guardrail = bounds.upperKind;
    } else if (value < bounds.lower) {
      value = bounds.lower;
      guardrail = bounds.lowerKind;
    }
  }
  if (floor > value) {
    value = floor;
    guardrail = 'order-book-floor';
  }
  return { value: Math.max(0, value), guardrail };
}
