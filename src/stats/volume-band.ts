// Volume bands by mean units per day. Count noise, dispersion and forecast accuracy all change with volume,
// so dispersion is pooled and accuracy is reported per band. Edges are common practice for daily item demand,
// not a published standard: below one a day is intermittent, 400+ a day is a fast mover.

export const VOLUME_BANDS = ['under-1', '1-10', '10-50', '50-400', '400-plus'] as const;
export type VolumeBand = (typeof VOLUME_BANDS)[number];

/** Lower edges (units per day) of each band, in the order of VOLUME_BANDS. */
export const VOLUME_BAND_LOWER_EDGES: readonly number[] = [0, 1, 10, 50, 400];

/** The band of a series whose mean demand is `meanUnitsPerDay` (non-finite or negative means count as 0). */
export function volumeBandOf(meanUnitsPerDay: number): VolumeBand {
  const m = Number.isFinite(meanUnitsPerDay) && meanUnitsPerDay > 0 ? meanUnitsPerDay : 0;
  if (m < 1) return 'under-1';
  if (m < 10) return '1-10';
  if (m < 50) return '10-50';
  if (m < 400) return '50-400';
  return '400-plus';
}

export function isVolumeBand(value: string): value is VolumeBand {
  return (VOLUME_BANDS as readonly string[]).includes(value);
}
