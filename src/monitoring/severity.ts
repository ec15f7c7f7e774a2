import { SEVERITIES, type Severity } from './lifecycle.ts';
import type { MonitoringSettings } from './settings.ts';

// How big a deviation is, and whether it is big enough to bother a person at all.

function level(value: number, medium: number, high: number): number {
  return value >= high ? 2 : value >= medium ? 1 : 0;
}

/**
 * From the relative size of the deviation, and where a price is known from the value at risk as well: the two
 * levels are averaged and rounded up, so a large swing on a cheap item and a small one on a costly item both land
 * in the middle.
 */
export function severityOf(relative: number, valueAtRisk: number | null, s: MonitoringSettings['severity']): Severity {
  const size = level(relative, s.mediumShare, s.highShare);
  if (valueAtRisk === null) return SEVERITIES[size]!;
  const value = level(valueAtRisk, s.mediumValue, s.highValue);
  return SEVERITIES[Math.ceil((size + value) / 2)]!;
}

/** The value floor: money where a price is known, else units and share of the expectation together. */
export function passesFloor(unitsAtRisk: number, relative: number, valueAtRisk: number | null, s: MonitoringSettings['floor']): boolean {
  if (valueAtRisk !== null) return valueAtRisk >= s.minValue;
  return unitsAtRisk >= s.minUnits && relative >= s.minShare;
}
