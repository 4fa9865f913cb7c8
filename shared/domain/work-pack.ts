/**
 * The work pack of an intervention stop as words: the parts kit packed with it and the plain text
 * sent to the crew when a stop is published and in the reminders before it (DEVELOPERS.md
 * decision 24). Chainage and times are written as everywhere else: km+m, site time with its zone.
 */
import { formatSiteDateTime } from '../site-time';
import { formatChainage } from './chainage';

/**
 * Spares packed with every stop's kit besides one cutter assembly per change, per disc size.
 * Common practice, no source; adjust to the site's failure history: a ring, a seal kit and a
 * bearing kit are the parts most often found damaged when a disc is taken off.
 */
export const kitSpares = [
  { item: 'spare ring', perChanges: 10 },
  { item: 'spare seal kit', perChanges: 10 },
  { item: 'spare bearing kit', perChanges: 20 },
] as const;

/** A disc size in inches as written on the kit list, e.g. 17″. */
export const inches = (sizeIn: number) => `${sizeIn}″`;

export interface KitLine {
  item: string;
  quantity: number;
  basis: string;
}

/** The parts kit for `changesBySize` changes per disc size (in): assemblies one per change, spares per `kitSpares`. */
export function partsKit(changesBySize: ReadonlyMap<number, number>): KitLine[] {
  return [...changesBySize.entries()]
    .sort((a, b) => a[0] - b[0])
    .flatMap(([sizeIn, n]) => [
      { item: `${inches(sizeIn)} disc cutter assembly`, quantity: n, basis: 'one per position changed' },
      ...kitSpares.map((s) => ({
        item: `${inches(sizeIn)} ${s.item}`,
        quantity: Math.ceil(n / s.perChanges),
        basis: `one per ${s.perChanges} changes, rounded up`,
      })),
    ]);
}

/** What the work-pack text reads of a stop's work pack (server/services/stops.ts loadWorkPack). */
export interface WorkPackForText {
  stop: {
    chainageM: number;
    ringNumber: number | null;
    plannedStart: Date | null;
    expectedHours: number | null;
    compressedAir: boolean;
    workingPressureBar: number | null;
  };
  crew: { name: string; members: readonly { name: string }[] } | null;
  positions: readonly {
    number: number;
    positionClass: string;
    twinDisc: boolean;
    fittedSerial: string | null;
    expectedWearMm: number | null;
    wearLimitMm: number;
  }[];
  storeSerials: readonly { serial: string }[];
  shortages: readonly { discSizeIn: number; needed: number; inStore: number }[];
  partsKit: readonly { item: string; quantity: number }[];
  cautions: readonly string[];
}

/**
 * The work pack as plain text for e-mail: where (km+m, ring), when (site time, zone named), air,
 * positions with the serials coming off, serials from the store, shortages, kit, crew, link and
 * cautions. `stopUrl` null: the link is replaced by where to find the stop in Kerfwise.
 */
export function workPackText(pack: WorkPackForText, project: { name: string; siteTimeZone: string }, stopUrl: string | null): string {
  const { stop } = pack;
  const pressure = stop.workingPressureBar != null ? ` (indicative working pressure ${stop.workingPressureBar.toFixed(2)} bar)` : '';
  const lines = [
    `${project.name}: cutter stop at chainage ${formatChainage(stop.chainageM)}${stop.ringNumber != null ? `, ring ${stop.ringNumber}` : ''}`,
    stop.plannedStart
      ? `Planned start: ${formatSiteDateTime(stop.plannedStart, project.siteTimeZone, { withZone: true })}, about ${stop.expectedHours ?? '?'} h.`
      : 'Not scheduled yet.',
    `Crew: ${pack.crew ? `${pack.crew.name} (${pack.crew.members.map((m) => m.name).join(', ') || 'no members'})` : 'none yet'}.`,
    stop.compressedAir ? `Worked in COMPRESSED AIR${pressure}.` : 'Worked in free air.',
    '',
    `Positions to change (${pack.positions.length}):`,
    ...pack.positions.map(
      (p) =>
        `  - position ${p.number} (${p.positionClass}${p.twinDisc ? ', twin' : ''}), ${p.fittedSerial ?? 'no serial'} off` +
        (p.expectedWearMm != null ? `, expected wear ${p.expectedWearMm.toFixed(1)} of ${p.wearLimitMm} mm` : ''),
    ),
    '',
    `From the store: ${pack.storeSerials.map((c) => c.serial).join(', ') || 'none'}.`,
    ...pack.shortages.map((s) => `SHORT: ${s.needed} ${inches(s.discSizeIn)} cutters needed, ${s.inStore} in store.`),
    `Parts kit: ${pack.partsKit.map((k) => `${k.quantity} × ${k.item}`).join('; ')}.`,
    '',
    stopUrl ? `Work pack: ${stopUrl}` : 'The work pack is on the stop’s page in Kerfwise.',
    '',
    ...pack.cautions.flatMap((c) => [c, '']),
  ];
  return `${lines.join('\n').trimEnd()}\n`;
}
