import type { Location } from '../contracts/location.ts';

// The demo's invented beverage distributor: three distribution centres, about forty items, a handful of customers
// each. Names are our own. Holiday dates are the real public holidays of 2026 in each city (recalled from memory;
// Easter 2026 falls on 5 April, from which Ascension and Whit Monday follow).

export interface DemoItem {
  readonly item: string;
  /** Typical weekly units at a mid-sized centre. */
  readonly weekly: number;
  /** How strongly hot weather lifts it (0 = not at all, 1 = doubles at full heat). */
  readonly heat: number;
  readonly unitPrice: number;
  readonly casePack: number;
}

const item = (id: string, weekly: number, heat: number, unitPrice: number, casePack: number): DemoItem => ({ item: id, weekly, heat, unitPrice, casePack });

export const ITEMS: readonly DemoItem[] = [
  item('SPARK-LEMON-330', 900, 0.8, 0.45, 24),
  item('SPARK-ORANGE-330', 700, 0.8, 0.45, 24),
  item('SPARK-LIME-330', 380, 0.8, 0.45, 24),
  item('SPARK-GRAPEFRUIT-330', 160, 0.7, 0.5, 24),
  item('COLA-330', 1400, 0.5, 0.5, 24),
  item('COLA-1L', 1100, 0.4, 1.1, 12),
  item('COLA-ZERO-330', 800, 0.5, 0.5, 24),
  item('COLA-ZERO-1L', 650, 0.4, 1.1, 12),
  item('TONIC-200', 240, 0.3, 0.6, 24),
  item('GINGER-ALE-200', 130, 0.3, 0.6, 24),
  item('BITTER-LEMON-200', 45, 0.3, 0.6, 24),
  item('ICED-TEA-PEACH-500', 600, 1.0, 0.9, 12),
  item('ICED-TEA-LEMON-500', 520, 1.0, 0.9, 12),
  item('ICED-TEA-GREEN-500', 210, 0.9, 0.95, 12),
  item('WATER-STILL-500', 1800, 1.0, 0.3, 24),
  item('WATER-STILL-1500', 1500, 0.9, 0.55, 6),
  item('WATER-SPARK-500', 950, 0.8, 0.35, 24),
  item('WATER-SPARK-1500', 700, 0.7, 0.6, 6),
  item('WATER-STILL-5L', 220, 0.6, 1.6, 4),
  item('ENERGY-250', 540, 0.2, 1.2, 24),
  item('ENERGY-SF-250', 260, 0.2, 1.2, 24),
  item('ENERGY-MANGO-500', 90, 0.3, 1.8, 12),
  item('JUICE-ORANGE-1L', 480, 0.2, 1.9, 6),
  item('JUICE-APPLE-1L', 420, 0.2, 1.7, 6),
  item('JUICE-MULTI-1L', 260, 0.2, 1.8, 6),
  item('JUICE-TOMATO-1L', 35, 0.0, 2.1, 6),
  item('NECTAR-PEACH-1L', 120, 0.3, 1.6, 6),
  item('COLD-BREW-250', 180, 0.6, 2.2, 12),
  item('COLD-BREW-OAT-250', 70, 0.6, 2.4, 12),
  item('SPORTS-BERRY-500', 330, 0.7, 1.1, 12),
  item('SPORTS-CITRUS-500', 300, 0.7, 1.1, 12),
  item('LEMONADE-1L', 410, 0.9, 1.3, 6),
  item('LEMONADE-PINK-1L', 150, 0.9, 1.4, 6),
  item('KOMBUCHA-GINGER-330', 85, 0.4, 2.3, 12),
  item('KOMBUCHA-BERRY-330', 60, 0.4, 2.3, 12),
  item('CIDER-FREE-330', 140, 0.5, 1.2, 24),
  item('MALT-FREE-330', 110, 0.3, 1.0, 24),
  item('SYRUP-ELDERFLOWER-500', 25, 0.5, 3.5, 6),
  item('SYRUP-MINT-500', 6, 0.5, 3.5, 6),
  item('COCONUT-WATER-330', 95, 0.8, 1.9, 12),
];

export interface DemoCentre {
  readonly master: Location;
  /** Size relative to a mid-sized centre. */
  readonly scale: number;
  readonly customers: readonly { readonly id: string; readonly share: number; readonly bookAheadDays: number }[];
  /** The source sends a day-closed record after each business day. */
  readonly sendsDayClosed: boolean;
}

const holidays = (...list: [string, string][]) => list.map(([date, name]) => ({ date, kind: 'closed' as const, name }));

export const CENTRES: readonly DemoCentre[] = [
  {
    master: {
      location: 'DC-NORTH' as Location['location'],
      timeZone: 'Europe/Berlin',
      closedWeekdays: ['saturday', 'sunday'],
      businessHours: { open: '06:00', close: '20:00' },
      dayCloseDeadline: '02:00',
      holidays: holidays(['2026-04-06', 'Easter Monday'], ['2026-05-01', 'Labour Day'], ['2026-05-14', 'Ascension Day'], ['2026-05-25', 'Whit Monday'], ['2026-10-03', 'German Unity Day']),
    },
    scale: 1.2,
    customers: [
      { id: 'NORDMARKT', share: 0.34, bookAheadDays: 6 },
      { id: 'FRISCHKAUF', share: 0.22, bookAheadDays: 4 },
      { id: 'KIOSK-KETTE', share: 0.14, bookAheadDays: 1 },
      { id: 'HOTEL-GRUPPE-N', share: 0.12, bookAheadDays: 8 },
      { id: 'TANKSTOP', share: 0.1, bookAheadDays: 2 },
      { id: 'CAFE-VERBUND', share: 0.08, bookAheadDays: 3 },
    ],
    sendsDayClosed: true,
  },
  {
    master: {
      location: 'DC-SOUTH' as Location['location'],
      timeZone: 'Europe/Madrid',
      closedWeekdays: ['sunday'],
      businessHours: { open: '07:00', close: '21:00' },
      holidays: holidays(['2026-05-01', 'Labour Day'], ['2026-05-15', 'San Isidro'], ['2026-08-15', 'Assumption']),
    },
    scale: 1.0,
    customers: [
      { id: 'MERCASOL', share: 0.3, bookAheadDays: 5 },
      { id: 'SUPER-MESETA', share: 0.24, bookAheadDays: 4 },
      { id: 'BAR-RED', share: 0.18, bookAheadDays: 1 },
      { id: 'HOSTAL-GRUPO', share: 0.14, bookAheadDays: 7 },
      { id: 'GASOLINERA-S', share: 0.14, bookAheadDays: 2 },
    ],
    sendsDayClosed: false,
  },
  {
    master: {
      location: 'DC-COAST' as Location['location'],
      timeZone: 'Europe/Lisbon',
      closedWeekdays: ['saturday', 'sunday'],
      businessHours: { open: '07:00', close: '19:00' },
      holidays: holidays(['2026-04-03', 'Good Friday'], ['2026-05-01', 'Labour Day'], ['2026-06-04', 'Corpus Christi'], ['2026-06-10', 'Portugal Day'], ['2026-08-15', 'Assumption']),
    },
    scale: 0.7,
    customers: [
      { id: 'ATLANTICO', share: 0.36, bookAheadDays: 5 },
      { id: 'MERCADO-AZUL', share: 0.26, bookAheadDays: 3 },
      { id: 'PRAIA-BARES', share: 0.22, bookAheadDays: 1 },
      { id: 'HOTEIS-COSTA', share: 0.16, bookAheadDays: 6 },
    ],
    sendsDayClosed: false,
  },
];

/** Master data with per-item prices and case packs, as written to locations.json. */
export function centreMaster(centre: DemoCentre, catalogue: readonly DemoItem[] = ITEMS): Location {
  const items = Object.fromEntries(catalogue.map((i) => [i.item, { unitPrice: i.unitPrice, casePack: i.casePack }]));
  return { ...centre.master, items };
}
