export * from './day-number.ts';
export * from './iso-week.ts';
export * from './weeks.ts';
export * from './location-calendar.ts';
