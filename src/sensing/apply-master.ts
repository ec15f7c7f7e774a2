import { dayNumber } from '../calendar/day-number.ts';
import { createLocationCalendar } from '../calendar/location-calendar.ts';
import type { DayClosed } from '../contracts/day-closed.ts';
import type { Location } from '../contracts/location.ts';
import { NearcastError } from '../errors.ts';
import type { LocationState } from './location-state.ts';
import { APPLIED, DUPLICATE, rejected, type ApplyOutcome } from './outcome.ts';

/** Applies new master data for the location; it applies from now on (the calendar is rebuilt). */
export function applyLocationMaster(state: LocationState, master: Location): ApplyOutcome {
  if (master.location !== state.location) {
    return rejected('NEARCAST_INPUT_WRONG_LOCATION', 'location', `belongs to ${master.location}, not ${state.location}`);
  }
  if (JSON.stringify(master) === JSON.stringify(state.master)) return DUPLICATE;
  try {
    state.calendar = createLocationCalendar(master);
  } catch (err) {
    const detail = err instanceof NearcastError ? err.details.join('; ') : 'is not a valid calendar';
    return rejected('NEARCAST_CALENDAR_INVALID', 'location', detail);
  }
  state.master = master;
  for (const s of state.series.values()) {
    s.changeCount++;
    s.layoutCount++;
  }
  return APPLIED;
}

/** Records that the source declared a local day complete. */
export function applyDayClosed(state: LocationState, record: DayClosed): ApplyOutcome {
  if (record.location !== state.location) {
    return rejected('NEARCAST_INPUT_WRONG_LOCATION', 'location', `belongs to ${record.location}, not ${state.location}`);
  }
  let day: number;
  try {
    day = dayNumber(record.date);
  } catch {
    return rejected('NEARCAST_INPUT_INVALID', 'date', 'must be a real calendar date written YYYY-MM-DD');
  }
  if (state.closedDays.has(day)) return DUPLICATE;
  state.closedDays.add(day);
  return APPLIED;
}
