import type { ItemId, LocationId } from '../contracts/ids.ts';
import { REPLAN_SCHEMA_VERSION, type ReplanEntry } from '../contracts/replan-entry.ts';
import { CUSUM_START } from './cusum.ts';
import type { SeriesDay } from './day-input.ts';
import type { MonitoringSettings } from './settings.ts';
import type { SeriesState } from './state.ts';
import { triggSignal, triggStart, triggStep } from './tracking-signal.ts';

// Baseline bias goes to the planning cycle, not to the page: each completed week is scored against the baseline as
// it was known at a fixed lead with Trigg's smoothed tracking signal (restarted at each re-plan), and the series
// whose baseline is persistently biased, or that sensing keeps adjusting the same way, are listed once a week.

type WeekClosed = NonNullable<SeriesDay['weekClosed']>;

/** A new baseline version is a re-plan: the evidence against the old one no longer applies. */
export function onBaselineVersion(series: SeriesState, version: number | null | undefined): boolean {
  if (version === undefined || version === null || version === series.baselineVersion) return false;
  const replanned = series.baselineVersion !== null;
  series.baselineVersion = version;
  if (replanned) {
    series.trigg = null;
    series.adjustRun = 0;
    series.history = [];
    // The new version is the planning cycle's answer to the old shift: the shift statistic restarts on it.
    Object.assign(series, { level: 1, cusum: CUSUM_START, run: { hiX: 0, hiMu: 0, loX: 0, loMu: 0 }, ewma: { z: 0, t: 0 } });
  }
  return replanned;
}

/** Scores one completed week (once: a week already scored is ignored). */
export function scoreWeek(series: SeriesState, week: WeekClosed, phi: number, s: MonitoringSettings): void {
  if (series.lastWeekScored !== null && week.weekStart <= series.lastWeekScored) return;
  const version = week.baselineVersionAtLead;
  // Weeks planned by a version older than the one in force belong to the evidence the re-plan already acted on.
  if (version !== undefined && version !== null && series.baselineVersion !== null && version < series.baselineVersion) {
    series.lastWeekScored = week.weekStart;
    return;
  }
  const b = week.baselineAtLead;
  // Until errors are seen, M starts at the mean absolute error of an unbiased baseline under count noise,
  // E|e| = σ√(2/π) for a normal error (recalled from memory).
  const sd = Math.sqrt(b + phi * b * b);
  series.trigg = triggStep(series.trigg ?? triggStart(sd * Math.sqrt(2 / Math.PI)), week.actual - b, s.replan.beta);
  const adjusted = week.adjustedAtLead ?? null;
  if (adjusted !== null && b > 0) {
    const r = adjusted / b;
    const t = s.replan.adjustShare;
    series.adjustRun = r >= 1 + t ? Math.max(0, series.adjustRun) + 1 : r <= 1 - t ? Math.min(0, series.adjustRun) - 1 : 0;
  } else {
    series.adjustRun = 0;
  }
  series.history = [...series.history, { weekStart: week.weekStart, actual: week.actual, baseline: b, adjusted }].slice(-52);
  series.lastWeekScored = week.weekStart;
}

export function replanList(location: string, weekOf: string, series: Record<string, SeriesState>, lead: number, s: MonitoringSettings): ReplanEntry[] {
  const out: ReplanEntry[] = [];
  for (const item of Object.keys(series).sort()) {
    const st = series[item]!;
    const weeks = st.trigg?.periods ?? 0;
    const recent = st.history.slice(-s.replan.historyWeeks);
    const sumA = recent.reduce((a, w) => a + w.actual, 0);
    const sumB = recent.reduce((a, w) => a + w.baseline, 0);
    const base = {
      schemaVersion: REPLAN_SCHEMA_VERSION,
      location: location as LocationId,
      item: item as ItemId,
      weekOf,
      lead,
      baselineVersion: st.baselineVersion,
      weeks,
      history: recent.map((w) => ({ ...w })),
    } as const;
    const t = st.trigg ? triggSignal(st.trigg) : null;
    const unitsPerWeek = recent.length > 0 ? (sumA - sumB) / recent.length : null;
    const floorOk = unitsPerWeek !== null && Math.abs(unitsPerWeek) >= s.floor.minUnits && sumB > 0 && Math.abs(sumA / sumB - 1) >= s.floor.minShare / 2;
    if (t !== null && weeks >= s.replan.minWeeks && Math.abs(t) > s.replan.limit && floorOk) {
      out.push({
        ...base,
        reason: 'baseline-bias',
        direction: t > 0 ? 'under' : 'over',
        trackingSignal: t,
        meanRatio: sumB > 0 ? sumA / sumB : null,
        unitsPerWeek,
        evidence:
          `Trigg's tracking signal ${t.toFixed(2)} (limit ±${s.replan.limit}) after ${weeks} weeks at lead ${lead}: ` +
          `actual demand ran ${Math.round(Math.abs(sumA / sumB - 1) * 100)}% ${t > 0 ? 'above' : 'below'} the baseline over the last ${recent.length} weeks.`,
      });
      continue;
    }
    if (Math.abs(st.adjustRun) >= s.replan.adjustWeeks) {
      const adj = recent.filter((w) => w.adjusted !== null);
      const sumAdj = adj.reduce((a, w) => a + (w.adjusted ?? 0), 0);
      const sumAdjB = adj.reduce((a, w) => a + w.baseline, 0);
      out.push({
        ...base,
        reason: 'persistent-adjustment',
        direction: st.adjustRun > 0 ? 'under' : 'over',
        trackingSignal: t,
        meanRatio: sumAdjB > 0 ? sumAdj / sumAdjB : null,
        unitsPerWeek: adj.length > 0 ? (sumAdj - sumAdjB) / adj.length : null,
        evidence:
          `The adjusted plan sat ${st.adjustRun > 0 ? 'above' : 'below'} the baseline by more than ${Math.round(s.replan.adjustShare * 100)}% ` +
          `for ${Math.abs(st.adjustRun)} weeks in a row at lead ${lead}.`,
      });
    }
  }
  return out.sort((a, b) => Math.abs(b.trackingSignal ?? 0) - Math.abs(a.trackingSignal ?? 0) || (a.item < b.item ? -1 : 1));
}
