import { dayNumber } from '../calendar/index.ts';
import { emptyScorecard, recordWeek, summarise, weeklyErrors, type ScorecardState } from '../accuracy/scorecard.ts';
import { emptySelfCheck, evaluateSelfCheck, isFallbackActive, type SelfCheckState } from '../accuracy/self-check.ts';
import type { Config } from '../config/config.ts';
import type { Location } from '../contracts/location.ts';
import type { Plan } from '../contracts/plan.ts';
import { applyCommand, checkFeed, DEFAULT_MONITORING_SETTINGS, initialMonitorState, monitorDay, restoreMonitorState, type MonitoringSettings, type MonitorState } from '../monitoring/index.ts';
import {
  applyBaselineVersion,
  applyDayClosed,
  applyLocationMaster,
  applyOrderLine,
  applyShipment,
  createLocationState,
  pruneLocationState,
  restoreLocationState,
  senseLocation,
  seriesColumns,
  sensingSettings,
  snapshotLocationState,
  type ApplyOutcome as SensingOutcome,
  type LocationState,
  type MonitoringInput,
  type SensingSettings,
} from '../sensing/index.ts';
import { monitoringDayInput } from './core/monitoring-day.ts';
import { assembleParts, C, F, S, type PartedBase, type PreviousPlans } from './core/parted-snapshot.ts';
import { seriesSave, type FullSave } from './core/series-tail.ts';
import { completeWeeks, emptyLedger, noteActual, notePlans, type WeekLedger } from './core/week-ledger.ts';
import { localDateOf } from './local-day.ts';
import type { ApplyOutcome, ClosedDayOutputs, DayFacts, FactRecord, FeedCheckFacts, LocationModel, LocationModelFactory, SenseAsOf, SensedDay } from './location-model-port.ts';
import type { AlertCommand } from './internal-records.ts';
import type { AccuracySummary } from '../contracts/accuracy-summary.ts';

// The runtime's binding of the pure core: sensing (state, apply, senseLocation), monitoring (monitorDay, checkFeed,
// applyCommand) and the self-check (scorecard, evaluateSelfCheck) for one location, behind the LocationModel port.


interface CoreSnapshot {
  sensing: unknown;
  monitor: MonitorState;
  previous: PreviousPlans;
  ledger: WeekLedger;
  scorecard: ScorecardState;
  selfCheck: SelfCheckState;
  /** Last closed plan date, and order lines for already closed days applied since (late data for monitoring). */
  lastClosed: string | null;
  late: Record<string, { date: string; quantity: number }[]>;
  /** See CoreLocationModel.pruneDue; absent when no prune waits. */
  pruneDue?: number;
}

interface CoreSensedDay extends SensedDay {
  readonly monitoringInputs?: readonly MonitoringInput[];
}

export interface CoreSettings {
  readonly sensing: SensingSettings;
  readonly monitoring: MonitoringSettings;
}

function outcome(o: SensingOutcome): ApplyOutcome {
  return o.status === 'rejected' ? { status: 'rejected', code: o.code, message: o.message, path: o.path } : { status: o.status };
}

function toPlans(location: string, prev: PreviousPlans): Plan[] {
  // senseLocation reads only item and leads[].weekStart/adjusted of the previous plans; keeping just those keeps the
  // snapshot small (a full plan with its explanation is a few kilobytes per series).
  return Object.entries(prev).map(([item, leads]) => ({ location, item, leads: leads.map(([weekStart, adjusted]) => ({ weekStart, adjusted })) }) as unknown as Plan);
}


class CoreLocationModel implements LocationModel {
  /** Parts changed since the last snapshotParts(); `null` = every part of that kind. */
  private dirtyS: Set<string> | null = null;
  private dirtyC: Set<string> | null = null;
  /** Parts written so far, to tombstone the ones that disappear (pruned series). */
  private writtenS = new Set<string>();
  private writtenF = new Set<string>();
  private writtenC = new Set<string>();
  /** Each series' last full save (`f:`) in this process; none after a restore, so the first save is full. */
  private fullSaves = new Map<string, FullSave>();
  /**
   * The day of a close that completed a week, while its prune of old rows has not run yet. The prune rewrites every
   * series' saved rows (tens of megabytes at 10k series), so it runs before whatever next touches the sensing state
   * rather than inside the close: the close's plans and manifest are committed without waiting for it. The state
   * goes through the same steps in the same order either way, and the prune changes no plan (see prune.ts).
   */
  private pruneDue: number | null;

  constructor(
    private sensing: LocationState,
    private s: Omit<CoreSnapshot, 'sensing'>,
    private readonly settings: CoreSettings,
    restoredParts = false,
    pruneDue: number | null = null,
  ) {
    this.pruneDue = pruneDue;
    if (restoredParts) {
      this.dirtyS = new Set();
      this.dirtyC = new Set();
      this.writtenS = new Set(sensing.series.keys());
      this.writtenF = new Set(sensing.series.keys());
      this.writtenC = new Set(this.closeItems());
    }
  }

  private touchS(item: string): void {
    this.dirtyS?.add(item);
  }

  private closeItems(): string[] {
    return [...new Set([...Object.keys(this.s.monitor.series), ...Object.keys(this.s.previous), ...Object.keys(this.s.ledger.series)])];
  }

  private pruneIfDue(): void {
    if (this.pruneDue === null) return;
    pruneLocationState(this.sensing, this.pruneDue);
    this.pruneDue = null;
    // Old rows left every series' saved rows: each is saved in full again.
    this.dirtyS = null;
  }

  setMaster(location: Location): void {
    this.pruneIfDue();
    applyLocationMaster(this.sensing, location);
  }

  apply(r: FactRecord): ApplyOutcome {
    this.pruneIfDue();
    const customers = this.sensing.customers.length;
    const result = this.applyToSensing(r);
    if (result.status !== 'rejected' && r.kind !== 'day-closed') this.touchS(r.record.item);
    // A new customer renumbers the saved customer indices of every series.
    if (this.sensing.customers.length !== customers) this.dirtyS = null;
    return result;
  }

  private applyToSensing(r: FactRecord): ApplyOutcome {
    const knownAt = { knownAt: r.arrivalMs };
    switch (r.kind) {
      case 'order-line': {
        const o = outcome(applyOrderLine(this.sensing, r.record, knownAt));
        const date = localDateOf(r.knowledgeMs, this.sensing.master.timeZone);
        if (o.status === 'applied' && r.record.revision === 1 && this.s.lastClosed !== null && date <= this.s.lastClosed) {
          (this.s.late[r.record.item] ??= []).push({ date, quantity: r.record.quantity ?? 0 });
        }
        return o;
      }
      case 'shipment':
        return outcome(applyShipment(this.sensing, r.record, knownAt));
      case 'baseline-version':
        return outcome(applyBaselineVersion(this.sensing, r.record, knownAt));
      case 'day-closed':
        return outcome(applyDayClosed(this.sensing, r.record));
    }
  }

  private fallbacks(): number[] {
    const leads: number[] = [];
    for (let L = 0; L <= this.settings.sensing.maxLead; L++) if (isFallbackActive(this.s.selfCheck, this.sensing.location, L)) leads.push(L);
    return leads;
  }

  sense(asOf: SenseAsOf): CoreSensedDay {
    // A close with no record since the one that completed a week (the deadline or the watermark closed it).
    this.pruneIfDue();
    const result = senseLocation(this.sensing, { planDate: asOf.planDate, knownAt: asOf.knowledgeMs }, this.settings.sensing, {
      selfCheckFallbacks: this.fallbacks(),
      previousPlans: toPlans(this.sensing.location, this.s.previous),
    });
    return { plans: result.plans, model: result.model, monitoringInputs: result.monitoringInputs };
  }

  published(day: CoreSensedDay): void {
    const mean = new Map((day.monitoringInputs ?? []).map((m) => [m.item, m.meanPerDay]));
    for (const item of Object.keys(this.s.previous)) this.dirtyC?.add(item);
    this.s.previous = Object.fromEntries(day.plans.map((p) => [p.item, p.leads.map((l) => [l.weekStart, l.adjusted] as [string, number])]));
    for (const p of day.plans) {
      noteActual(this.s.ledger, p, mean.get(p.item));
      this.dirtyC?.add(p.item);
    }
  }

  closeDay(day: CoreSensedDay, facts: DayFacts): ClosedDayOutputs {
    const location = this.sensing.location;
    const week = day.plans[0]?.leads[0]?.weekStart ?? this.s.ledger.lastWeek ?? facts.planDate;
    const completed = completeWeeks(this.s.ledger, week);
    const accuracy: AccuracySummary[] = [];
    for (const c of completed) {
      for (const [lead, series] of [...c.byLead].sort((a, b) => a[0] - b[0])) {
        this.s.scorecard = recordWeek(this.s.scorecard, { location, lead, weekStart: c.weekStart, series }).state;
        const weeks = weeklyErrors(this.s.scorecard, location, lead, c.weekStart);
        this.s.selfCheck = evaluateSelfCheck(this.s.selfCheck, { location, lead, throughWeek: c.weekStart, weeks }).state;
      }
      if (c.byLead.size > 0) accuracy.push(...summarise(this.s.scorecard, { location, throughWeek: c.weekStart, selfCheck: this.s.selfCheck }));
    }
    const input = monitoringDayInput({
      master: this.sensing.master,
      plans: day.plans,
      model: day.model,
      inputs: day.monitoringInputs ?? [],
      facts,
      completed,
      monitoredLead: this.settings.monitoring.replan.lead,
      late: new Map(Object.entries(this.s.late)),
    });
    // The stage drops the whole state when a batch fails (sensing-stage.ts), so nothing reads the old one again.
    const result = monitorDay(this.s.monitor, input, this.settings.monitoring, { handOver: true });
    this.s.monitor = result.state;
    notePlans(this.s.ledger, day.plans, new Map((day.monitoringInputs ?? []).map((m) => [m.item, m.meanPerDay])));
    this.s.lastClosed = facts.planDate;
    this.s.late = {};
    // Monitoring updates every series it watches at each close.
    this.dirtyC = null;
    if (completed.length > 0) {
      // Old rows leave the state once a week, before the next change (see pruneDue).
      this.pruneIfDue();
      this.pruneDue = dayNumber(facts.planDate);
    }
    return { alerts: result.alerts, replan: result.replan ?? [], accuracy };
  }

  feedCheck(check: FeedCheckFacts) {
    const m = this.sensing.master;
    const result = checkFeed(
      this.s.monitor,
      { location: m.location, atMs: check.atMs, timeZone: m.timeZone, lastRecordMs: check.lastRecordMs, isBusinessDay: check.isBusinessDay, ...(m.businessHours ? { businessHours: m.businessHours } : {}) },
      this.settings.monitoring,
    );
    this.s.monitor = result.state;
    return { alerts: result.alerts };
  }

  command(c: AlertCommand) {
    const result = applyCommand(
      this.s.monitor,
      { commandId: c.commandId, alertId: c.alertId, action: c.action, atMs: c.atMs, ...(c.until ? { until: c.until } : {}), ...(c.by ? { by: c.by } : {}) },
      this.settings.monitoring,
    );
    this.s.monitor = result.state;
    if (result.refused) return { alerts: result.alerts, refused: result.refused };
    return { alerts: result.alerts };
  }

  snapshot(): CoreSnapshot {
    return { sensing: snapshotLocationState(this.sensing), ...this.s, ...this.pruneDueField() };
  }

  /** Written only while a prune waits, so a location never waiting snapshots as it did before the field existed. */
  private pruneDueField(): { pruneDue?: number } {
    return this.pruneDue === null ? {} : { pruneDue: this.pruneDue };
  }

  snapshotParts(): { base: unknown; parts: ReadonlyMap<string, unknown> } {
    const parts = new Map<string, unknown>();
    const sItems = this.dirtyS === null ? this.sensing.series.keys() : this.dirtyS;
    for (const snap of seriesColumns(this.sensing, sItems)) {
      const save = seriesSave(snap, this.fullSaves.get(snap.item));
      if (save.kind === 'full') {
        parts.set(`${F}${snap.item}`, save.full);
        this.fullSaves.set(snap.item, save.save);
        this.writtenF.add(snap.item);
      }
      parts.set(`${S}${snap.item}`, save.tail);
    }
    for (const item of this.writtenS) if (!this.sensing.series.has(item)) parts.set(`${S}${item}`, null);
    for (const item of this.writtenF) {
      if (this.sensing.series.has(item)) continue;
      parts.set(`${F}${item}`, null);
      this.writtenF.delete(item);
      this.fullSaves.delete(item);
    }
    this.writtenS = new Set(this.sensing.series.keys());

    const closeItems = this.closeItems();
    for (const item of this.dirtyC === null ? closeItems : [...this.dirtyC]) {
      const m = this.s.monitor.series[item];
      const p = this.s.previous[item];
      const l = this.s.ledger.series[item];
      parts.set(`${C}${item}`, m === undefined && p === undefined && l === undefined ? null : { m: m ?? null, p: p ?? null, l: l ?? null });
    }
    const current = new Set(closeItems);
    for (const item of this.writtenC) if (!current.has(item)) parts.set(`${C}${item}`, null);
    this.writtenC = current;
    this.dirtyS = new Set();
    this.dirtyC = new Set();

    const base = {
      sensing: snapshotLocationState({ ...this.sensing, series: new Map() }),
      monitor: { ...this.s.monitor, series: {} },
      // Monitoring walks its series in insertion order; a restore keeps that order.
      monitorOrder: Object.keys(this.s.monitor.series),
      ledgerWeek: this.s.ledger.lastWeek,
      scorecard: this.s.scorecard,
      selfCheck: this.s.selfCheck,
      lastClosed: this.s.lastClosed,
      late: this.s.late,
      ...this.pruneDueField(),
    };
    return { base, parts };
  }
}

export function createCoreModelsFrom(settings: CoreSettings): LocationModelFactory {
  return {
    create: (location) =>
      new CoreLocationModel(
        createLocationState(location, settings.sensing),
        { monitor: initialMonitorState(location.location), previous: {}, ledger: emptyLedger(), scorecard: emptyScorecard(), selfCheck: emptySelfCheck(), lastClosed: null, late: {} },
        settings,
      ),
    restore: (snapshot) => {
      const snap = snapshot as CoreSnapshot;
      // Same key order as create(): a restored location snapshots to the same bytes as one never restored.
      return new CoreLocationModel(
        restoreLocationState(snap.sensing),
        {
          monitor: restoreMonitorState(snap.monitor),
          previous: snap.previous,
          ledger: snap.ledger,
          scorecard: snap.scorecard,
          selfCheck: snap.selfCheck,
          lastClosed: snap.lastClosed,
          late: snap.late,
        },
        settings,
        false,
        snap.pruneDue ?? null,
      );
    },
    restoreParts: (baseValue, parts) => {
      const a = assembleParts(baseValue as PartedBase, parts);
      return new CoreLocationModel(
        restoreLocationState(a.sensing),
        { monitor: restoreMonitorState(a.monitor), previous: a.previous, ledger: a.ledger, scorecard: a.scorecard, selfCheck: a.selfCheck, lastClosed: a.lastClosed, late: a.late },
        settings,
        true,
        (baseValue as PartedBase).pruneDue ?? null,
      );
    },
  };
}

/** The core engine with the deployment's settings (demand basis from the configuration). */
export function createCoreModels(config: Pick<Config, 'demandBasis'>): LocationModelFactory {
  return createCoreModelsFrom({ sensing: sensingSettings({ demandBasis: config.demandBasis }), monitoring: DEFAULT_MONITORING_SETTINGS });
}
