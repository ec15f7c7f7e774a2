import type { AlertEntry } from './state.ts';

// Plain words for the planner on call: what moved, by how much, since when, and what to look at first. Quantities
// only; money stays in valueAtRisk (a distribution centre never sees prices).

const fmt = (v: number | null): string => (v === null ? '?' : Math.abs(v) >= 100 ? String(Math.round(v)) : String(Math.round(v * 10) / 10));
const pct = (v: number | null): string => (v === null ? '?' : `${Math.round(Math.abs(v) * 100)}%`);

export function describeAlert(e: AlertEntry): { message: string; whatToCheck: string } {
  const m = e.measure;
  const where = `${e.item} at ${e.location}`;
  switch (e.rule) {
    case 'spike':
    case 'drop':
      return {
        message:
          `${where}: ${fmt(m.observed)} ordered on ${e.life.lastSignalOn}, expected ${fmt(m.expected)} ` +
          `(limits ${fmt(m.lower)}–${fmt(m.upper)}), ${pct(m.relative)} ${e.rule === 'spike' ? 'above' : 'below'}; episode since ${e.episodeStart}.`,
        whatToCheck:
          e.rule === 'spike'
            ? 'Look for one large or duplicated order, a promotion or a customer stocking up; confirm the lines are real before moving stock.'
            : 'Check whether a large customer skipped its usual order or orders are stuck upstream; confirm with the customer team before cutting supply.',
      };
    case 'shift-up':
    case 'shift-down':
      return {
        message:
          `${where}: intake has run ${pct(m.levelRatio === null ? null : m.levelRatio - 1)} ${e.rule === 'shift-up' ? 'above' : 'below'} the baseline ` +
          `since about ${e.episodeStart} (about ${fmt(m.unitsAtRisk)} units a week).`,
        whatToCheck: 'A sustained change, not one odd day: check for a won or lost customer, a listing change or a competitor; the baseline may need a re-plan.',
      };
    case 'plan-divergence':
      return {
        message: `${where}: the adjusted plan is ${pct(m.relative)} ${m.levelRatio !== null && m.levelRatio < 1 ? 'below' : 'above'} the baseline for the monitored week, and the baseline is outside the plan's band.`,
        whatToCheck: "Review the plan's explanation (order book, coverage, recent ratio) and decide whether to follow it or the baseline.",
      };
    case 'feed-stalled':
      return {
        message: `${e.location}: no order lines or shipments received for a long stretch of business hours since ${e.episodeStart}; drop alerts are held back meanwhile.`,
        whatToCheck: "Check the location's order feed and its connection; records that arrive late are applied as late data, not as a spike.",
      };
    case 'day-not-closed':
      return {
        message: `${e.location}: the source did not close ${e.episodeStart} by its deadline; the day was closed on the deadline.`,
        whatToCheck: 'Check that the source system finished its day; late records for the day will be applied as late data.',
      };
    case 'demand-up':
    case 'demand-down': {
      // The customer's name is in the record's `customer` field only (hidden from distribution centres).
      const who = e.scope === 'customer' ? `one customer at ${e.location}` : e.scope === 'item' ? `${e.item} across locations` : e.location;
      const members = e.members.slice(0, 5).map((k) => (e.scope === 'item' ? k.slice(0, k.indexOf('|')) : k.slice(k.indexOf('|') + 1)));
      return {
        message:
          `${who}: ${e.members.length} ${e.scope === 'item' ? 'locations' : 'items'} ${e.rule === 'demand-up' ? 'up' : 'down'} together since ${e.episodeStart} ` +
          `(about ${fmt(m.unitsAtRisk)} units); e.g. ${members.join(', ')}.`,
        whatToCheck:
          e.scope === 'customer'
            ? 'One customer moves many items: ask the customer team about a stock-up, a new store or a lost contract.'
            : 'Many items move together: look for a common cause (weather, a holiday, a competitor, a feed problem) before acting item by item.',
      };
    }
  }
}
