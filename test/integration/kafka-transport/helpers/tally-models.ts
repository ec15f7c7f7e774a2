import type { Location } from '../../../../src/contracts/location.ts';
import type { Plan } from '../../../../src/contracts/plan.ts';
import type { LocationModel, LocationModelFactory } from '../../../../src/runtime/location-model-port.ts';
import { tallyPlan } from './tally-stage.ts';

// A stand-in for the sensing engine behind the runtime's real SensingStage (until the core adapter exists): per
// item the sum of the order lines' current quantities (highest revision wins, a duplicate event id changes nothing),
// published as lead 0 of one plan per item. Day closing, publication order, manifests and revisions are the
// runtime's own code; only the numbers come from here.

interface TallyModelState {
  location: string;
  lines: Record<string, { revision: number; item: string; quantity: number }>;
  events: Record<string, 1>;
}

class TallyModel implements LocationModel {
  constructor(private state: TallyModelState) {}

  setMaster(location: Location): void {
    this.state.location = location.location;
  }

  apply(record: Parameters<LocationModel['apply']>[0]) {
    if (record.kind !== 'order-line') return { status: 'applied' as const };
    const r = record.record;
    if (this.state.events[r.eventId]) return { status: 'duplicate' as const };
    this.state.events[r.eventId] = 1;
    const key = `${r.orderId}|${r.lineId}`;
    const current = this.state.lines[key];
    if (current && current.revision >= r.revision) return { status: 'superseded' as const };
    this.state.lines[key] = { revision: r.revision, item: r.item, quantity: r.op === 'cancel' ? 0 : (r.quantity ?? 0) };
    return { status: 'applied' as const };
  }

  sense(asOf: { planDate: string }) {
    const totals = new Map<string, { quantity: number; lines: number }>();
    for (const line of Object.values(this.state.lines)) {
      const t = totals.get(line.item) ?? { quantity: 0, lines: 0 };
      t.quantity += line.quantity;
      t.lines += 1;
      totals.set(line.item, t);
    }
    const plans: Plan[] = [...totals].map(([item, t]) => tallyPlan(this.state.location, item, asOf.planDate, 1, t.quantity, t.lines));
    return { plans, model: [] };
  }

  published(): void {}

  closeDay() {
    return { alerts: [], replan: [], accuracy: [] };
  }

  command() {
    return { alerts: [] };
  }

  snapshot(): unknown {
    return structuredClone(this.state);
  }
}

export const tallyModels: LocationModelFactory = {
  create: (location) => new TallyModel({ location: location.location, lines: {}, events: {} }),
  restore: (snapshot) => new TallyModel(structuredClone(snapshot) as TallyModelState),
};
