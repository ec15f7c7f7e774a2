import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isActive, openLifecycle, step, type Lifecycle, type LifecycleEvent } from '../../../src/monitoring/lifecycle.ts';
import { addDays } from '../../../src/monitoring/dates.ts';
import { DEFAULT_MONITORING_SETTINGS } from '../../../src/monitoring/settings.ts';

const S = DEFAULT_MONITORING_SETTINGS.lifecycle;
const START = '2026-03-02';

// Events on consecutive days, as monitoring and planners would produce them.
const eventArb = fc.oneof(
  fc.record({ kind: fc.constant('signal' as const), severity: fc.constantFrom('low' as const, 'medium' as const, 'high' as const) }),
  fc.record({ kind: fc.constant('in-control' as const) }),
  fc.record({ kind: fc.constant('cleared' as const) }),
  fc.record({ kind: fc.constant('day' as const) }),
  fc.record({ kind: fc.constant('acknowledge' as const) }),
  fc.record({ kind: fc.constant('resolve' as const) }),
  fc.record({ kind: fc.constant('snooze' as const), days: fc.integer({ min: -1, max: 10 }) }),
);
type Gen = { kind: string; severity?: 'low' | 'medium' | 'high'; days?: number };

function toEvent(g: Gen, on: string): LifecycleEvent {
  if (g.kind === 'signal') return { kind: 'signal', on, severity: g.severity! };
  if (g.kind === 'snooze') return { kind: 'snooze', on, until: addDays(on, g.days!) };
  return { kind: g.kind, on } as LifecycleEvent;
}

function walk(events: Gen[]): Array<{ before: Lifecycle; after: Lifecycle; change: string | null; refused: boolean; newEpisode: boolean; event: LifecycleEvent }> {
  let l = openLifecycle(START, 'medium');
  return events.map((g, i) => {
    const event = toEvent(g, addDays(START, i + 1));
    const r = step(l, event, S);
    const out = { before: l, after: r.next, change: r.change, refused: r.refused !== undefined, newEpisode: r.newEpisode === true, event };
    l = r.next;
    return out;
  });
}

describe('the alert lifecycle', () => {
  it('resolves only an alert that was open, acknowledged or snoozed (property)', () => {
    fc.assert(
      fc.property(fc.array(eventArb, { maxLength: 60 }), (events) => {
        for (const s of walk(events)) {
          if (s.change === 'resolved' || s.change === 'auto-resolved') {
            expect(['open', 'acknowledged', 'snoozed']).toContain(s.before.state);
            expect(s.after.state).toBe('resolved');
          }
          // Nothing but a change moves the visible state.
          if (s.change === null) expect(s.after.state).toBe(s.before.state);
        }
      }),
    );
  });

  it('keeps an acknowledgement while the deviation does not get worse (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.oneof(fc.constant('same'), fc.constant('milder'), fc.constant('day'), fc.constant('in-control')), { maxLength: 30 }),
        (kinds) => {
          let l = step(openLifecycle(START, 'medium'), { kind: 'acknowledge', on: START }, S).next;
          let quiet = 0;
          for (const [i, k] of kinds.entries()) {
            const on = addDays(START, i + 1);
            const event: LifecycleEvent =
              k === 'same' ? { kind: 'signal', on, severity: 'medium' } : k === 'milder' ? { kind: 'signal', on, severity: 'low' } : k === 'day' ? { kind: 'day', on } : { kind: 'in-control', on };
            quiet = k === 'in-control' ? quiet + 1 : k === 'day' ? quiet : 0;
            l = step(l, event, S).next;
            // Only a run of in-control days may end it (auto-resolve); nothing reverts it to open.
            expect(l.state).toBe(quiet >= S.resolveAfterDays ? 'resolved' : 'acknowledged');
            if (l.state === 'resolved') break;
          }
        },
      ),
    );
  });

  it('re-escalates an acknowledged alert that gets worse', () => {
    const acked = step(openLifecycle(START, 'low'), { kind: 'acknowledge', on: START }, S).next;
    const r = step(acked, { kind: 'signal', on: addDays(START, 1), severity: 'high' }, S);
    expect(r.change).toBe('escalated');
    expect(r.next).toMatchObject({ state: 'open', severity: 'high' });
  });

  it('auto-resolves after the configured run of in-control days, and a signal inside the run restarts it', () => {
    let l = openLifecycle(START, 'medium');
    const changes: (string | null)[] = [];
    const plan = ['in-control', 'in-control', 'signal', 'in-control', 'in-control', 'in-control', 'in-control', 'in-control'];
    plan.forEach((k, i) => {
      const on = addDays(START, i + 1);
      const r = step(l, k === 'signal' ? { kind: 'signal', on, severity: 'medium' } : { kind: 'in-control', on }, S);
      changes.push(r.change);
      l = r.next;
    });
    expect(S.resolveAfterDays).toBe(5);
    expect(changes).toEqual([null, null, null, null, null, null, null, 'auto-resolved']);
  });

  it('re-opens the same alert when it fires within a few days of resolving, and asks for a new one after that', () => {
    const resolvedOn = addDays(START, 5);
    const resolved = step(openLifecycle(START, 'low'), { kind: 'cleared', on: resolvedOn }, S).next;
    expect(step(resolved, { kind: 'signal', on: addDays(resolvedOn, S.reopenWithinDays), severity: 'low' }, S).change).toBe('reopened');
    const late = step(resolved, { kind: 'signal', on: addDays(resolvedOn, S.reopenWithinDays + 1), severity: 'low' }, S);
    expect(late.change).toBeNull();
    expect(late.newEpisode).toBe(true);
  });

  it('does not bring back an alert a person resolved while its run goes on, unless it gets worse', () => {
    const byPerson = step(openLifecycle(START, 'medium'), { kind: 'resolve', on: START }, S).next;
    const same = step(byPerson, { kind: 'signal', on: addDays(START, 1), severity: 'medium' }, S);
    expect(same.change).toBeNull();
    expect(same.newEpisode).toBeUndefined();
    expect(step(byPerson, { kind: 'signal', on: addDays(START, 1), severity: 'high' }, S).change).toBe('escalated');
  });

  it('bounds a snooze and ends it after its last day', () => {
    const open = openLifecycle(START, 'medium');
    expect(step(open, { kind: 'snooze', on: START, until: addDays(START, S.maxSnoozeDays + 1) }, S).refused?.code).toBe('NEARCAST_ALERT_SNOOZE_INVALID');
    const snoozed = step(open, { kind: 'snooze', on: START, until: addDays(START, 2) }, S).next;
    expect(step(snoozed, { kind: 'day', on: addDays(START, 2) }, S).change).toBeNull();
    const ended = step(snoozed, { kind: 'day', on: addDays(START, 3) }, S);
    expect(ended.change).toBe('snooze-ended');
    expect(ended.next.state).toBe('open');
  });

  it('refuses to acknowledge or snooze a resolved alert and treats repeats as no change', () => {
    const resolved = step(openLifecycle(START, 'low'), { kind: 'resolve', on: START }, S).next;
    expect(step(resolved, { kind: 'acknowledge', on: START }, S).refused?.code).toBe('NEARCAST_ALERT_TRANSITION_INVALID');
    expect(step(resolved, { kind: 'resolve', on: START }, S).change).toBeNull();
    const acked = step(openLifecycle(START, 'low'), { kind: 'acknowledge', on: START }, S).next;
    expect(step(acked, { kind: 'acknowledge', on: START }, S).change).toBeNull();
    expect(isActive(acked)).toBe(true);
  });
});
