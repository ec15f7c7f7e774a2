// Public surface of the sensing engine (see .team/INTERFACES.md).
export { sensingSettings, DEFAULT_SENSING_SETTINGS, sensingSettingsSchema, retentionWeeks, type SensingSettings, type SensingSettingsInput } from './settings.ts';
export { createLocationState, type LocationState, type ApplyOptions } from './location-state.ts';
export { applyOrderLine } from './apply-order-line.ts';
export { applyShipment } from './apply-shipment.ts';
export { applyBaselineVersion } from './apply-baseline.ts';
export { applyLocationMaster, applyDayClosed } from './apply-master.ts';
export { snapshotLocationState, seriesColumns, encodeSeries, type SeriesColumns, restoreLocationState, cloneLocationState, STATE_SCHEMA, type LocationStateSnapshot } from './snapshot.ts';
export { encodeColumn, decodeColumn } from './column-codec.ts';
export { pruneLocationState, type PruneResult } from './prune.ts';
export type { ApplyOutcome } from './outcome.ts';
export { senseLocation, senseWork, type SenseOptions, type SenseResult, type SenseWork } from './sense-location.ts';
export type { AsOf } from './recompute-context.ts';
export type { MonitoringInput } from './monitoring-inputs.ts';
export { featuresAt } from './feature-audit.ts';
export type { Features } from './features.ts';
