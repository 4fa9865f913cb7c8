/**
 * The columns of Kerfwise's CSV imports, in one place for the server's reader (server/lib/csv/)
 * and the client's column-mapping screen: each target field with its label, how its cells are
 * read, and the header names it is recognised by; how header names are compared; and which
 * column a file's header proposes for each field.
 */
import type { AdvanceLogField, GeologySectionField } from './schemas/advance-log';

/** How a cell is read: a number (decimal point or, for a whole file, decimal comma), a date and time, text, or yes/no. */
export type CsvValueType = 'number' | 'time' | 'text' | 'yesNo';

/** One target field of an import: its label (with unit) and the header names it is recognised by. */
export interface CsvFieldInfo<F extends string> {
  field: F;
  label: string;
  type: CsvValueType;
  /** Header names that map to this field, compared by normalizeHeader. */
  synonyms: readonly string[];
}

/** Target field → header of the source column, as chosen on the mapping screen. */
export type ColumnMapping<F extends string> = Partial<Record<F, string>>;

/** Units a header may end with, after a space or an underscore ("Thrust kN", "thrust_kn", "penetration_mm_per_rev"). */
const TRAILING_UNIT = /^(.*\S)\s+(mm\/rev|mm\/u|mm per rev|mm rev|kn·m|kn\.m|kn-m|kn m|knm|kn|mpa|rpm|1\/min|mm|m|in|deg|°)$/;

/**
 * A header as compared with the synonyms: lower case, bracketed text dropped, underscores read as
 * spaces, a trailing unit dropped, then letters and digits only. "Thrust [kN]", "thrust_kn" and
 * "Thrust" all give "thrust"; "water_head_m" gives "waterhead".
 */
export function normalizeHeader(header: string): string {
  let name = header
    .toLowerCase()
    .replace(/[([{][^)\]}]*[)\]}]/g, ' ')
    .replace(/_/g, ' ')
    .trim();
  const unit = TRAILING_UNIT.exec(name);
  if (unit) name = unit[1];
  return name.replace(/[^a-z0-9]/g, '');
}

/** Whether `header` names `info`'s field. */
export function headerMatches(info: CsvFieldInfo<string>, header: string): boolean {
  const name = normalizeHeader(header);
  return name !== '' && info.synonyms.some((s) => normalizeHeader(s) === name);
}

/**
 * The column proposed for each field: the one remembered from the last import when the file has
 * it, else the first unused column whose name Kerfwise recognises (the reader on the server
 * matches the same way).
 */
export function proposeMapping<F extends string>(
  headers: string[],
  fields: readonly CsvFieldInfo<F>[],
  stored: ColumnMapping<F> | null,
): ColumnMapping<F> {
  const used = new Set<string>();
  const choice: ColumnMapping<F> = {};
  for (const { field } of fields) {
    const wanted = stored?.[field];
    const remembered = wanted && headers.find((h) => h.toLowerCase() === wanted.toLowerCase());
    if (remembered) {
      choice[field] = remembered;
      used.add(remembered);
    }
  }
  for (const info of fields) {
    if (choice[info.field]) continue;
    const found = headers.find((h) => !used.has(h) && headerMatches(info, h));
    if (found) {
      choice[info.field] = found;
      used.add(found);
    }
  }
  return choice;
}

/** Required field groups (each needs one mapped column) that `mapping` leaves without a column. */
export function missingColumnGroups<F extends string>(mapping: ColumnMapping<F>, required: readonly (readonly F[])[]): (readonly F[])[] {
  return required.filter((group) => !group.some((f) => mapping[f]));
}

// ----- advance log -----

export const advanceLogFields: readonly CsvFieldInfo<AdvanceLogField>[] = [
  {
    field: 'ringNumber',
    label: 'Ring / stroke number',
    type: 'number',
    synonyms: ['ring', 'ring no', 'ring nr', 'ring number', 'ring id', 'stroke', 'stroke no', 'stroke number'],
  },
  {
    field: 'startTime',
    label: 'Start time',
    type: 'time',
    synonyms: ['start time', 'start', 'begin', 'begin time', 'started', 'start date time', 'start datetime', 'time start'],
  },
  {
    field: 'endTime',
    label: 'End time',
    type: 'time',
    synonyms: ['end time', 'end', 'finish', 'finish time', 'finished', 'end date time', 'end datetime', 'time end'],
  },
  {
    field: 'chainageStartM',
    label: 'Chainage start (m)',
    type: 'number',
    synonyms: ['chainage start', 'chainage from', 'start chainage', 'from chainage', 'ch start', 'ch from', 'from'],
  },
  {
    field: 'chainageEndM',
    label: 'Chainage end (m)',
    type: 'number',
    synonyms: ['chainage end', 'chainage to', 'end chainage', 'to chainage', 'ch end', 'ch to', 'to'],
  },
  {
    field: 'revolutions',
    label: 'Cutterhead revolutions',
    type: 'number',
    synonyms: ['revolutions', 'cutterhead revolutions', 'revs', 'cutterhead revs', 'rev count'],
  },
  {
    field: 'penetrationMmPerRev',
    label: 'Penetration (mm/rev)',
    type: 'number',
    synonyms: ['penetration', 'pen', 'penetration per rev', 'penetration per revolution'],
  },
  {
    field: 'rpm',
    label: 'Cutterhead speed (rpm)',
    type: 'number',
    synonyms: ['rpm', 'cutterhead speed', 'cutterhead rpm', 'rotation speed'],
  },
  { field: 'thrustKn', label: 'Thrust (kN)', type: 'number', synonyms: ['thrust', 'total thrust', 'thrust force'] },
  { field: 'torqueKnm', label: 'Torque (kN·m)', type: 'number', synonyms: ['torque', 'cutterhead torque'] },
];

/** Each inner list needs at least one mapped column: revolutions may come from penetration instead. */
export const advanceLogRequiredColumns: readonly (readonly AdvanceLogField[])[] = [
  ['ringNumber'],
  ['startTime'],
  ['endTime'],
  ['chainageStartM'],
  ['chainageEndM'],
  ['revolutions', 'penetrationMmPerRev'],
];

// ----- geology long section -----

export const geologySectionFields: readonly CsvFieldInfo<GeologySectionField>[] = [
  {
    field: 'chainageFromM',
    label: 'Chainage from (m)',
    type: 'number',
    synonyms: ['chainage from', 'from chainage', 'from', 'ch from', 'chainage start', 'start chainage', 'start'],
  },
  {
    field: 'chainageToM',
    label: 'Chainage to (m)',
    type: 'number',
    synonyms: ['chainage to', 'to chainage', 'to', 'ch to', 'chainage end', 'end chainage', 'end'],
  },
  {
    field: 'groundTypeName',
    label: 'Ground type',
    type: 'text',
    synonyms: ['ground type', 'ground', 'geology', 'rock type', 'lithology', 'ground class', 'ground type name'],
  },
  {
    field: 'waterHeadM',
    label: 'Water head above axis (m)',
    type: 'number',
    synonyms: ['water head above axis', 'water head', 'groundwater head', 'head above axis', 'water level above axis'],
  },
  {
    field: 'stopAllowed',
    label: 'Stop allowed (yes/no)',
    type: 'yesNo',
    synonyms: ['stop allowed', 'stops allowed', 'stopping allowed', 'can stop', 'intervention allowed'],
  },
  { field: 'stopReason', label: 'Stop reason', type: 'text', synonyms: ['stop reason', 'reason', 'stop note', 'stop remark'] },
  {
    field: 'ucsMpa',
    label: 'UCS of the ground type (MPa)',
    type: 'number',
    synonyms: ['ucs', 'uniaxial compressive strength', 'rock strength'],
  },
  {
    field: 'cai',
    label: 'CAI of the ground type',
    type: 'number',
    synonyms: ['cai', 'cerchar abrasivity index', 'cerchar abrasivity', 'abrasivity'],
  },
];

export const geologySectionRequiredColumns: readonly (readonly GeologySectionField[])[] = [
  ['chainageFromM'],
  ['chainageToM'],
  ['groundTypeName'],
  ['stopAllowed'],
];

// ----- cutterhead layout -----

export const layoutFieldNames = [
  'number',
  'trackRadiusMm',
  'positionClass',
  'discSizeIn',
  'tiltDeg',
  'wearLimitMm',
  'twinDisc',
  'angleDeg',
] as const;
export type LayoutField = (typeof layoutFieldNames)[number];

/** The layout file Kerfwise writes (src/features/cutterhead) uses the first synonym of each field as its header. */
export const layoutFields: readonly CsvFieldInfo<LayoutField>[] = [
  { field: 'number', label: 'Position number', type: 'number', synonyms: ['number', 'position', 'position number', 'position no', 'pos'] },
  { field: 'trackRadiusMm', label: 'Track radius (mm)', type: 'number', synonyms: ['track radius', 'radius'] },
  { field: 'positionClass', label: 'Class (centre/face/gauge)', type: 'text', synonyms: ['class', 'position class'] },
  { field: 'discSizeIn', label: 'Disc size (in)', type: 'number', synonyms: ['disc size', 'disc diameter', 'disc'] },
  { field: 'tiltDeg', label: 'Tilt (°)', type: 'number', synonyms: ['tilt', 'tilt angle'] },
  { field: 'wearLimitMm', label: 'Wear limit (mm)', type: 'number', synonyms: ['wear limit', 'limit'] },
  { field: 'twinDisc', label: 'Twin disc (yes/no)', type: 'yesNo', synonyms: ['twin disc', 'twin'] },
  { field: 'angleDeg', label: 'Angle on the head (°)', type: 'number', synonyms: ['angle', 'angle on head'] },
];

export const layoutRequiredColumns: readonly (readonly LayoutField[])[] = [
  ['number'],
  ['trackRadiusMm'],
  ['positionClass'],
  ['discSizeIn'],
  ['wearLimitMm'],
];
