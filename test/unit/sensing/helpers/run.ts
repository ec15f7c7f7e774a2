import { applyBaselineVersion } from '../../../../src/sensing/apply-baseline.ts';
import { applyOrderLine } from '../../../../src/sensing/apply-order-line.ts';
import { applyShipment } from '../../../../src/sensing/apply-shipment.ts';
import { createLocationState, type LocationState } from '../../../../src/sensing/location-state.ts';
import type { ApplyOutcome } from '../../../../src/sensing/outcome.ts';
import { senseLocation, type SenseOptions, type SenseResult } from '../../../../src/sensing/sense-location.ts';
import { DEFAULT_SENSING_SETTINGS, type SensingSettings } from '../../../../src/sensing/settings.ts';
import { closeOf, type Scenario, type ScenarioRecord } from './scenario.ts';

export function applyRecord(state: LocationState, r: ScenarioRecord): ApplyOutcome {
  switch (r.kind) {
    case 'order-line':
      return applyOrderLine(state, r.record);
    case 'shipment':
      return applyShipment(state, r.record);
    case 'baseline-version':
      return applyBaselineVersion(state, r.record);
  }
}

/** A state holding every record of the scenario (plans at earlier dates see only what was known then). */
export function stateOf(scenario: Scenario, settings: SensingSettings = DEFAULT_SENSING_SETTINGS, records = scenario.records): LocationState {
  const state = createLocationState(scenario.master, settings);
  for (const r of records) {
    const out = applyRecord(state, r);
    if (out.status === 'rejected') throw new Error(`generated record rejected: ${out.code} ${out.message}`);
  }
  return state;
}

export function planAt(state: LocationState, date: string, settings: SensingSettings = DEFAULT_SENSING_SETTINGS, options?: SenseOptions): SenseResult {
  return senseLocation(state, { planDate: date, knownAt: closeOf(date) }, settings, options);
}

export function leadOf(result: SenseResult, item: string, lead: number) {
  const plan = result.plans.find((p) => p.item === item);
  if (!plan) throw new Error(`no plan for ${item}`);
  return plan.leads[lead]!;
}
