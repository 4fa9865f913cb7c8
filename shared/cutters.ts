/** Words of the cutter trade as Kerfwise uses them: position classes, disc conditions, cutter states. */

export const positionClasses = ['centre', 'face', 'gauge'] as const;
export type PositionClass = (typeof positionClasses)[number];

export const positionClassLabels: Record<PositionClass, string> = { centre: 'Centre', face: 'Face', gauge: 'Gauge' };

/**
 * Kerfwise's own short list of what a fitter sees on a disc. Several may apply to one disc.
 * `abnormal` conditions keep an inspection out of the wear fit (they are counted as sudden
 * failures instead); `needsChange` ones call for a change whatever the wear.
 */
export const discConditions = [
  { key: 'even_wear', label: 'Even wear', abnormal: false, needsChange: false },
  { key: 'flat_spot', label: 'Flat spot (blocked disc)', abnormal: true, needsChange: true },
  { key: 'chipped_ring', label: 'Chipped ring', abnormal: true, needsChange: false },
  { key: 'cracked_ring', label: 'Cracked ring', abnormal: true, needsChange: true },
  { key: 'ring_lost', label: 'Ring lost', abnormal: true, needsChange: true },
  { key: 'edge_deformed', label: 'Edge deformed', abnormal: true, needsChange: false },
  { key: 'seal_leaking', label: 'Seal leaking', abnormal: false, needsChange: true },
  { key: 'bearing_fault', label: 'Bearing loose or seized', abnormal: false, needsChange: true },
  { key: 'hub_damage', label: 'Hub or housing damage', abnormal: false, needsChange: true },
] as const;

export type DiscCondition = (typeof discConditions)[number]['key'];
export const discConditionKeys = discConditions.map((c) => c.key) as [DiscCondition, ...DiscCondition[]];
export const conditionLabel = (key: DiscCondition) => discConditions.find((c) => c.key === key)?.label ?? key;
export const isAbnormal = (keys: readonly DiscCondition[]) => keys.some((k) => discConditions.find((c) => c.key === k)?.abnormal);
export const conditionNeedsChange = (keys: readonly DiscCondition[]) =>
  keys.some((k) => discConditions.find((c) => c.key === k)?.needsChange);

export const cutterStatuses = ['in_store', 'fitted', 'workshop', 'scrapped'] as const;
export type CutterStatus = (typeof cutterStatuses)[number];
export const cutterStatusLabels: Record<CutterStatus, string> = {
  in_store: 'In store',
  fitted: 'Fitted',
  workshop: 'In the workshop',
  scrapped: 'Scrapped',
};

/** Wear as a fraction of the position's limit, and whether it is over. */
export function wearState(wearMm: number | null, limitMm: number): { fraction: number | null; overLimit: boolean } {
  if (wearMm == null) return { fraction: null, overLimit: false };
  return { fraction: wearMm / limitMm, overLimit: wearMm >= limitMm };
}
