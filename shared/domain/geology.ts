/**
 * The geology long section: ground types and the sections of chainage they occupy.
 *
 * Sections are half-open in chainage, [chainageFromM, chainageToM): a chainage on a shared
 * boundary belongs to the section that begins there. Chainage outside every section is
 * "unknown ground" (groundTypeId null), never silently given a neighbour's ground type.
 */

export interface GroundType {
  id: string;
  name: string;
  /** Mean Cerchar Abrasivity Index of the ground type, null while untested. */
  cai: number | null;
}

export interface GeologySection {
  chainageFromM: number;
  /** Greater than chainageFromM, whatever the drive direction. */
  chainageToM: number;
  groundTypeId: string;
  /** Groundwater head above the tunnel in m, null when not given. */
  waterHeadM: number | null;
  /** Whether an intervention stop may be planned in this section. */
  stopAllowed: boolean;
  /** Why a stop is not allowed (or a note about stopping here), null when none. */
  stopReason: string | null;
}

/** A section whose chainage range is empty or reversed (or not a number). */
export interface GeologyRangeError {
  kind: 'invalid_range';
  index: number;
}

/** Two sections that cover the same chainage [fromM, toM); indices into the input list. */
export interface GeologyOverlapError {
  kind: 'overlap';
  indexA: number;
  indexB: number;
  fromM: number;
  toM: number;
}

/** Chainage [fromM, toM) between two sections that no section covers (unknown ground). */
export interface GeologyGapWarning {
  kind: 'gap';
  beforeIndex: number;
  afterIndex: number;
  fromM: number;
  toM: number;
}

export interface GeologyValidation {
  errors: (GeologyRangeError | GeologyOverlapError)[];
  warnings: GeologyGapWarning[];
}

/** One stretch of a chainage interval lying in one section (or in none); chainages in m. */
export interface ChainagePiece {
  /** Where the piece starts in the direction of travel (greater than toM when chainage decreases). */
  fromM: number;
  toM: number;
  lengthM: number;
  /** Null for unknown ground. */
  groundTypeId: string | null;
  /** Index of the section in the input list, null for unknown ground. */
  sectionIndex: number | null;
}

/** Indices of the sections with a valid range, sorted by chainage from (then to). */
function sortedValidIndices(sections: readonly GeologySection[]): number[] {
  return sections
    .map((_, i) => i)
    .filter((i) => sections[i].chainageFromM < sections[i].chainageToM)
    .sort((a, b) => sections[a].chainageFromM - sections[b].chainageFromM || sections[a].chainageToM - sections[b].chainageToM);
}

/** Checks a long section: errors for invalid ranges and every overlapping pair, warnings for gaps between sections (chainage in m). */
export function validateGeologySections(sections: readonly GeologySection[]): GeologyValidation {
  const errors: GeologyValidation['errors'] = [];
  const warnings: GeologyGapWarning[] = [];
  sections.forEach((s, index) => {
    if (!(s.chainageFromM < s.chainageToM)) errors.push({ kind: 'invalid_range', index });
  });
  const order = sortedValidIndices(sections);
  let coveredToM = -Infinity;
  let coveredToIndex = -1;
  order.forEach((a, k) => {
    const sa = sections[a];
    // Sorted by start, so every later section starting before sa ends overlaps it.
    for (let m = k + 1; m < order.length && sections[order[m]].chainageFromM < sa.chainageToM; m += 1) {
      const b = order[m];
      const toM = Math.min(sa.chainageToM, sections[b].chainageToM);
      errors.push({ kind: 'overlap', indexA: a, indexB: b, fromM: sections[b].chainageFromM, toM });
    }
    if (coveredToIndex >= 0 && sa.chainageFromM > coveredToM) {
      warnings.push({ kind: 'gap', beforeIndex: coveredToIndex, afterIndex: a, fromM: coveredToM, toM: sa.chainageFromM });
    }
    if (sa.chainageToM > coveredToM) {
      coveredToM = sa.chainageToM;
      coveredToIndex = a;
    }
  });
  return { errors, warnings };
}

function sectionIndexAt(sections: readonly GeologySection[], chainageM: number): number | null {
  const inside = sections.findIndex((s) => s.chainageFromM <= chainageM && chainageM < s.chainageToM);
  if (inside >= 0) return inside;
  const atEnd = sections.findIndex((s) => s.chainageFromM < s.chainageToM && s.chainageToM === chainageM);
  return atEnd >= 0 ? atEnd : null;
}

/**
 * The section at `chainageM` (m): on a shared boundary the one that begins there; at the end of
 * a section nothing follows, that section. Undefined in unknown ground.
 */
export function findSectionAt(sections: readonly GeologySection[], chainageM: number): GeologySection | undefined {
  const index = sectionIndexAt(sections, chainageM);
  return index === null ? undefined : sections[index];
}

/**
 * Splits the chainage interval from `fromM` to `toM` (m; `fromM` > `toM` when chainage decreases)
 * into pieces by section, in the order travelled. The pieces tile the interval exactly; stretches
 * outside every section come back as unknown ground. An interval of zero length gives one piece of
 * zero length carrying the ground at that chainage. Meant for validated sections; if they overlap
 * anyway, the overlap goes to the section that starts first, so no chainage is counted twice.
 */
export function splitChainageBySection(sections: readonly GeologySection[], fromM: number, toM: number): ChainagePiece[] {
  return chainageSplitter(sections)(fromM, toM);
}

/**
 * splitChainageBySection for many intervals over the same sections: the sections are sorted once
 * (an advance log of 10,000 strokes splits 10,000 intervals).
 */
export function chainageSplitter(sections: readonly GeologySection[]): (fromM: number, toM: number) => ChainagePiece[] {
  const order = sortedValidIndices(sections);
  // reach[k]: the furthest chainage to among order[0..k]; sections before the first k whose reach
  // passes the interval's lower end lie wholly below it and add no piece, so the walk starts there.
  const reach: number[] = [];
  for (const i of order) reach.push(Math.max(reach.at(-1) ?? -Infinity, sections[i].chainageToM));
  return (fromM, toM) => {
    if (!Number.isFinite(fromM) || !Number.isFinite(toM)) throw new RangeError(`Chainage must be finite, got ${fromM} to ${toM}`);
    if (fromM === toM) {
      const index = sectionIndexAt(sections, fromM);
      return [{ fromM, toM, lengthM: 0, groundTypeId: index === null ? null : sections[index].groundTypeId, sectionIndex: index }];
    }
    const loM = Math.min(fromM, toM);
    const hiM = Math.max(fromM, toM);
    const pieces: ChainagePiece[] = [];
    const push = (a: number, b: number, sectionIndex: number | null) => {
      pieces.push({
        fromM: a,
        toM: b,
        lengthM: b - a,
        groundTypeId: sectionIndex === null ? null : sections[sectionIndex].groundTypeId,
        sectionIndex,
      });
    };
    let cursorM = loM;
    let lo = 0;
    let hi = order.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (reach[mid] <= loM) lo = mid + 1;
      else hi = mid;
    }
    for (let k = lo; k < order.length; k += 1) {
      const i = order[k];
      const s = sections[i];
      const startM = Math.max(cursorM, s.chainageFromM);
      const endM = Math.min(hiM, s.chainageToM);
      if (s.chainageFromM >= hiM) break;
      if (endM <= startM) continue;
      if (startM > cursorM) push(cursorM, startM, null);
      push(startM, endM, i);
      cursorM = endM;
    }
    if (cursorM < hiM) push(cursorM, hiM, null);
    if (fromM < toM) return pieces;
    return pieces.reverse().map((p) => ({ ...p, fromM: p.toM, toM: p.fromM }));
  };
}
