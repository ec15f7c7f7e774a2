// Deviation monitoring: the pure core the runtime calls. See .team/INTERFACES.md (monitoring section).
export { monitorDay, type Digest, type MonitorDayResult } from './monitor-day.ts';
export { checkFeed, applyCommand, type IntradayResult } from './intraday.ts';
export { groupAcrossLocations, initialCrossLocationState, type CrossLocationState } from './cross-location.ts';
export { initialMonitorState, restoreMonitorState, type MonitorState } from './state.ts';
export { monitoringSettings, DEFAULT_MONITORING_SETTINGS, type MonitoringSettings, type MonitoringSettingsInput } from './settings.ts';
export type { DayInput, SeriesDay, MonitorCommand, FeedCheck } from './day-input.ts';
