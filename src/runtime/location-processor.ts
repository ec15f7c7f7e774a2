import type { Plan } from '../contracts/plan.ts';
import { deadLetter } from './dead-letter.ts';
import { eventTimeMs, type EventLogRecord } from './event-log-record.ts';
import { addDays, isBusinessDay, localDateOf, watermarkCloseMs } from './local-day.ts';
import type { DayFacts, LocationModel, SenseAsOf, SensedDay } from './location-model-port.ts';
import type { LocationRuntimeState } from './location-runtime-state.ts';
import { accuracyOutput, alertOutput, buildManifest, deadLetterOutput, manifestOutput, planOutput, planText, replanOutput } from './output-records.ts';
import { restatementShare } from './restatement.ts';
import type { StageSettings } from './stage-settings.ts';
import type { BatchResult, OutputRecord } from './stage-output.ts';

type Close = BatchResult['closes'][number];

/**
 * Applies one event-log record to one location, in the order DESIGN section 6 fixes: first the closes the record
 * makes due (so a close sees exactly the records that arrived before its moment), then a debounced restatement,
 * then the record itself.
 */
export class LocationProcessor {
  constructor(
    readonly state: LocationRuntimeState,
    readonly model: LocationModel,
    private readonly settings: StageSettings,
    private readonly outputs: OutputRecord[],
    private readonly closes: Close[],
  ) {}

  handle(record: EventLogRecord): void {
    const s = this.state;
    switch (record.kind) {
      case 'location':
        s.master = record.record;
        this.model.setMaster(record.record);
        break;
      case 'order-line':
      case 'shipment':
      case 'baseline-version':
        this.advanceWatermark(record);
        this.maybeRestate(record.arrivalMs);
        this.applyFact(record);
        break;
      case 'day-closed': {
        const outcome = this.model.apply(record);
        if (outcome.status === 'rejected') this.refuse(record, outcome.code, outcome.message, outcome.path);
        else this.closeThrough(record.record.date, 'day-closed', record.arrivalMs, true);
        break;
      }
      case 'deadline-close':
        this.closeThrough(record.record.date, 'deadline', record.record.deadlineMs, false);
        break;
      case 'feed-health-check':
        this.maybeRestate(record.arrivalMs);
        this.checkFeed(record.record.atMs, record.arrivalMs);
        break;
      case 'alert-command': {
        const result = this.model.command(record.record);
        for (const alert of result.alerts) this.outputs.push(alertOutput(this.settings.eventSource, alert, record.arrivalMs));
        if (result.refused) this.refuse(record, result.refused.code, result.refused.message);
        break;
      }
    }
    if (record.arrivalMs > s.logMs) s.logMs = record.arrivalMs;
  }

  private applyFact(record: Extract<EventLogRecord, { kind: 'order-line' | 'shipment' | 'baseline-version' }>): void {
    const s = this.state;
    const outcome = this.model.apply(record);
    if (outcome.status === 'rejected') {
      this.refuse(record, outcome.code, outcome.message, outcome.path);
      return;
    }
    if (record.kind === 'baseline-version') return;
    s.lastFeedArrivalMs = Math.max(s.lastFeedArrivalMs ?? record.arrivalMs, record.arrivalMs);
    if (s.nextDate === null) s.nextDate = localDateOf(Math.min(record.knowledgeMs, record.arrivalMs + this.settings.watermarkSkewMs), s.master.timeZone);
    // Late data: a fact for a day already published. Applied now, reflected by a restatement or the next close.
    const late = s.lastClose !== null && localDateOf(record.knowledgeMs, s.master.timeZone) <= s.lastClose.planDate;
    if (late && outcome.status === 'applied' && s.lateSinceMs === null) s.lateSinceMs = record.arrivalMs;
  }

  private advanceWatermark(record: EventLogRecord): void {
    const t = eventTimeMs(record);
    if (t === undefined) return;
    const s = this.state;
    const capped = Math.min(t, record.arrivalMs + this.settings.watermarkSkewMs);
    if (s.watermarkMs !== null && capped <= s.watermarkMs) return;
    s.watermarkMs = capped;
    while (s.nextDate !== null) {
      const at = watermarkCloseMs(s.nextDate, s.master.timeZone, this.settings.closeGraceMs);
      if (at > capped) break;
      this.closeDay(s.nextDate, 'watermark', at);
    }
  }

  private closeThrough(date: string, closedBy: DayFacts['closedBy'], atMs: number, startIfIdle: boolean): void {
    const s = this.state;
    if (s.nextDate === null) {
      if (!startIfIdle) return;
      s.nextDate = date;
    }
    while (s.nextDate <= date) this.closeDay(s.nextDate, closedBy, atMs);
  }

  private closeDay(date: string, closedBy: DayFacts['closedBy'], closeMs: number): void {
    const s = this.state;
    s.nextDate = addDays(date, 1);
    if (!isBusinessDay(s.master, date)) return;
    const asOf: SenseAsOf = { planDate: date, knowledgeMs: closeMs };
    const day = this.model.sense(asOf);
    const plans = this.publish(day, asOf, 1, closeMs);
    const facts: DayFacts = {
      planDate: date,
      closedBy,
      ownDeadline: s.master.dayCloseDeadline !== undefined,
      feedStalled: s.stalledDates.includes(date),
      closeMs,
      lastRecordMs: s.lastFeedArrivalMs,
    };
    const out = this.model.closeDay({ ...day, plans }, facts);
    const src = this.settings.eventSource;
    for (const alert of out.alerts) this.outputs.push(alertOutput(src, alert, closeMs));
    for (const entry of out.replan) this.outputs.push(replanOutput(src, entry, closeMs));
    for (const summary of out.accuracy) this.outputs.push(accuracyOutput(src, summary, closeMs));
    s.stalledDates = s.stalledDates.filter((d) => d > date);
    s.lateSinceMs = null;
  }

  /** Publishes one plan per series in key order, then the manifest; remembers what was published. */
  private publish(day: SensedDay, asOf: SenseAsOf, revision: number, timeMs: number): Plan[] {
    const s = this.state;
    const plans = [...day.plans].sort((a, b) => (a.item < b.item ? -1 : a.item > b.item ? 1 : 0)).map((p) => ({ ...p, revision }));
    const src = this.settings.eventSource;
    const texts = plans.map(planText);
    for (let i = 0; i < plans.length; i++) this.outputs.push(planOutput(src, plans[i]!, timeMs, texts[i]));
    this.outputs.push(manifestOutput(src, buildManifest(s.master.location, asOf.planDate, revision, plans, day.model, texts), timeMs));
    this.model.published({ ...day, plans }, asOf, revision);
    s.lastClose = {
      planDate: asOf.planDate,
      revision,
      closeMs: timeMs,
      adjusted: Object.fromEntries(plans.map((p) => [p.item, p.leads.map((l) => l.adjusted)])),
    };
    this.closes.push({ location: s.location, planDate: asOf.planDate, revision, series: plans.length });
    return plans;
  }

  /** Late data, once debounced: republish the last plan date with the next revision if the change is material. */
  private maybeRestate(nowMs: number): void {
    const s = this.state;
    if (s.lateSinceMs === null || s.lastClose === null || nowMs < s.lateSinceMs + this.settings.restatementDebounceMs) return;
    s.lateSinceMs = null;
    const asOf: SenseAsOf = { planDate: s.lastClose.planDate, knowledgeMs: Math.max(s.logMs, s.lastClose.closeMs) };
    const day = this.model.sense(asOf);
    if (restatementShare(s.lastClose.adjusted, day.plans) > this.settings.restatementThreshold) {
      this.publish(day, asOf, s.lastClose.revision + 1, nowMs);
    }
  }

  private checkFeed(atMs: number, arrivalMs: number): void {
    const s = this.state;
    const date = localDateOf(atMs, s.master.timeZone);
    const result = this.model.feedCheck?.({ atMs, lastRecordMs: s.lastFeedArrivalMs, isBusinessDay: isBusinessDay(s.master, date) });
    for (const alert of result?.alerts ?? []) this.outputs.push(alertOutput(this.settings.eventSource, alert, arrivalMs));
    const silentSince = s.lastFeedArrivalMs ?? Number.NEGATIVE_INFINITY;
    if (atMs - silentSince <= this.settings.feedStallAfterMs) return;
    if ((s.nextDate === null || date >= s.nextDate) && !s.stalledDates.includes(date)) s.stalledDates.push(date);
  }

  private refuse(record: EventLogRecord, code: Parameters<typeof deadLetter>[0]['code'], message: string, path = ''): void {
    const dl = deadLetter({
      type: record.kind,
      code,
      issues: [{ path, message }],
      stage: 'sensing',
      source: record.source,
      location: record.location,
      arrivalMs: record.arrivalMs,
      raw: JSON.stringify(record.record),
    });
    this.outputs.push(deadLetterOutput(this.settings.eventSource, dl));
  }
}
