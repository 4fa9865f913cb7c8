import { TZDate } from '@date-fns/tz';
import { addDays, startOfDay } from 'date-fns';
import { siteIsoWeek, siteWeekStart } from '../site-time';

/** A downtime event over [start, end). */
export interface DowntimeEvent {
  id: string;
  cause: string;
  start: Date;
  end: Date;
}

/** A shift runs from its local start time (HH:mm) until the next shift of the pattern starts. */
export interface ShiftStart {
  name: string;
  startLocal: string;
}

/** A stroke (or ring) of boring over [start, end). */
export interface BoringInterval {
  start: Date;
  end: Date;
}

export interface CauseWeekHours {
  cause: string;
  /** ISO week of the site's local time, e.g. '2026-W11'. */
  isoWeek: string;
  hours: number;
}

export interface CauseShiftHours {
  cause: string;
  shift: string;
  hours: number;
}

export interface ProposedDowntime {
  start: Date;
  end: Date;
  hours: number;
}

export interface EventOverlap {
  firstId: string;
  secondId: string;
  hours: number;
}

const HOUR_MS = 3_600_000;

/** A point where a new period (labelled) begins. */
interface Cut {
  atMs: number;
  label: string;
}

function assertOrdered(event: DowntimeEvent): void {
  if (event.end.getTime() < event.start.getTime()) {
    throw new RangeError(`downtime event ${event.id} ends before it starts`);
  }
}

/**
 * Split [startMs, endMs) at `cuts` (sorted, the first at or before startMs) into real elapsed
 * hours per label.
 */
function hoursByLabel(startMs: number, endMs: number, cuts: Cut[]): Map<string, number> {
  const hours = new Map<string, number>();
  cuts.forEach((cut, i) => {
    const from = Math.max(startMs, cut.atMs);
    const to = Math.min(endMs, cuts[i + 1]?.atMs ?? endMs);
    if (to > from) hours.set(cut.label, (hours.get(cut.label) ?? 0) + (to - from) / HOUR_MS);
  });
  return hours;
}

/** Local Monday-00:00 cuts covering [startMs, endMs). */
function weekCuts(startMs: number, endMs: number, timeZone: string): Cut[] {
  const cuts: Cut[] = [];
  for (let w = 0, monday = siteWeekStart(startMs, timeZone); monday.getTime() < endMs; monday = siteWeekStart(startMs, timeZone, ++w)) {
    cuts.push({ atMs: monday.getTime(), label: siteIsoWeek(monday, timeZone) });
  }
  return cuts;
}

interface LocalShiftStart {
  name: string;
  hour: number;
  minute: number;
}

function parseShifts(pattern: readonly ShiftStart[]): LocalShiftStart[] {
  if (pattern.length === 0) throw new RangeError('a shift pattern needs at least one shift');
  const shifts = pattern.map(({ name, startLocal }) => {
    const m = /^([01]\d|2[0-3]):([0-5]\d)$/.exec(startLocal);
    if (!m) throw new RangeError(`shift ${name} start must be HH:mm, got ${startLocal}`);
    return { name, hour: Number(m[1]), minute: Number(m[2]) };
  });
  const minutes = new Set(shifts.map((s) => s.hour * 60 + s.minute));
  if (minutes.size !== shifts.length) throw new RangeError('two shifts start at the same time');
  return shifts;
}

/**
 * Local shift-start cuts covering [startMs, endMs), starting the day before so that the shift
 * running at startMs is included.
 */
function shiftCuts(startMs: number, endMs: number, shifts: readonly LocalShiftStart[], timeZone: string): Cut[] {
  const cuts: Cut[] = [];
  for (let day = startOfDay(addDays(new TZDate(startMs, timeZone), -1)); day.getTime() < endMs; day = addDays(day, 1)) {
    for (const s of shifts) {
      // Built from wall-clock fields so each start is the local time on that date, whatever the UTC offset.
      const at = new TZDate(day.getFullYear(), day.getMonth(), day.getDate(), s.hour, s.minute, timeZone);
      cuts.push({ atMs: at.getTime(), label: s.name });
    }
  }
  return cuts.sort((a, b) => a.atMs - b.atMs);
}

/** Real elapsed hours of all events per cause and period label, the periods given by `cutsFor`. */
function hoursByCauseAndLabel(
  events: readonly DowntimeEvent[],
  cutsFor: (startMs: number, endMs: number) => Cut[],
): { cause: string; label: string; hours: number }[] {
  const totals = new Map<string, Map<string, number>>();
  for (const event of events) {
    assertOrdered(event);
    const startMs = event.start.getTime();
    const endMs = event.end.getTime();
    const byLabel = totals.get(event.cause) ?? new Map<string, number>();
    totals.set(event.cause, byLabel);
    for (const [label, hours] of hoursByLabel(startMs, endMs, cutsFor(startMs, endMs))) {
      byLabel.set(label, (byLabel.get(label) ?? 0) + hours);
    }
  }
  return [...totals].flatMap(([cause, byLabel]) => [...byLabel].map(([label, hours]) => ({ cause, label, hours })));
}

/** Every ISO week of the site's local time in `timeZone` that [start, end) touches, in order (e.g. a report's columns). */
export function isoWeeksTouching(start: Date, end: Date, timeZone: string): string[] {
  return weekCuts(start.getTime(), end.getTime(), timeZone).map((c) => c.label);
}

/**
 * Downtime hours (real elapsed) per cause and ISO week of the site's local time in `timeZone`
 * (IANA); events crossing Monday 00:00 local are split there.
 */
export function downtimeHoursByCauseAndWeek(events: readonly DowntimeEvent[], timeZone: string): CauseWeekHours[] {
  return hoursByCauseAndLabel(events, (startMs, endMs) => weekCuts(startMs, endMs, timeZone)).map(({ cause, label, hours }) => ({
    cause,
    isoWeek: label,
    hours,
  }));
}

/**
 * Downtime hours (real elapsed) per cause and shift, shifts starting at local times in
 * `timeZone` (IANA); a shift over a daylight-saving change is an hour shorter or longer.
 */
export function downtimeHoursByCauseAndShift(
  events: readonly DowntimeEvent[],
  pattern: readonly ShiftStart[],
  timeZone: string,
): CauseShiftHours[] {
  const shifts = parseShifts(pattern);
  return hoursByCauseAndLabel(events, (startMs, endMs) => shiftCuts(startMs, endMs, shifts, timeZone)).map(({ cause, label, hours }) => ({
    cause,
    shift: label,
    hours,
  }));
}

/** Utilisation (fraction 0–1): boring time inside [periodStart, periodEnd) / calendar time of the period. */
export function utilisation(boring: readonly BoringInterval[], periodStart: Date, periodEnd: Date): number {
  const fromMs = periodStart.getTime();
  const toMs = periodEnd.getTime();
  if (!(toMs > fromMs)) throw new RangeError('the period must end after it starts');
  const boringMs = boring.reduce((sum, b) => sum + Math.max(0, Math.min(toMs, b.end.getTime()) - Math.max(fromMs, b.start.getTime())), 0);
  return boringMs / (toMs - fromMs);
}

/** Share (fraction 0–1) of downtime hours whose cause is cutter work; 0 when there is no downtime. */
export function cutterWorkShare(events: readonly DowntimeEvent[], cutterWorkCauses: readonly string[]): number {
  const flagged = new Set(cutterWorkCauses);
  let totalMs = 0;
  let cutterMs = 0;
  for (const event of events) {
    assertOrdered(event);
    const ms = event.end.getTime() - event.start.getTime();
    totalMs += ms;
    if (flagged.has(event.cause)) cutterMs += ms;
  }
  return totalMs === 0 ? 0 : cutterMs / totalMs;
}

/** Advance rate in metres per day (24 real hours) for `advanceM` bored over [periodStart, periodEnd). */
export function metresPerDay(advanceM: number, periodStart: Date, periodEnd: Date): number {
  const days = (periodEnd.getTime() - periodStart.getTime()) / (24 * HOUR_MS);
  if (!(days > 0)) throw new RangeError('the period must end after it starts');
  return advanceM / days;
}

/**
 * Proposed downtime events for every gap between strokes longer than `minGapMinutes`, from the
 * latest stroke end so far (strokes may overlap) to the next stroke start.
 */
export function proposeDowntimeFromGaps(strokes: readonly BoringInterval[], minGapMinutes: number): ProposedDowntime[] {
  const sorted = [...strokes].sort((a, b) => a.start.getTime() - b.start.getTime());
  const proposals: ProposedDowntime[] = [];
  let latestEndMs = -Infinity;
  for (const stroke of sorted) {
    const gapMs = stroke.start.getTime() - latestEndMs;
    if (Number.isFinite(gapMs) && gapMs > minGapMinutes * 60_000) {
      proposals.push({ start: new Date(latestEndMs), end: new Date(stroke.start), hours: gapMs / HOUR_MS });
    }
    latestEndMs = Math.max(latestEndMs, stroke.end.getTime());
  }
  return proposals;
}

/** Ids of events that end at or before they start (an empty or reversed interval). */
export function findEventsEndingBeforeStart(events: readonly DowntimeEvent[]): string[] {
  return events.filter((e) => e.end.getTime() <= e.start.getTime()).map((e) => e.id);
}

/** Pairs of events whose [start, end) intervals overlap, with the overlap in hours; touching ends do not overlap. */
export function findOverlappingEvents(events: readonly DowntimeEvent[]): EventOverlap[] {
  const sorted = [...events].sort((a, b) => a.start.getTime() - b.start.getTime());
  const overlaps: EventOverlap[] = [];
  sorted.forEach((first, i) => {
    for (const second of sorted.slice(i + 1)) {
      if (second.start.getTime() >= first.end.getTime()) break;
      const overlapMs = Math.min(first.end.getTime(), second.end.getTime()) - second.start.getTime();
      if (overlapMs > 0) overlaps.push({ firstId: first.id, secondId: second.id, hours: overlapMs / HOUR_MS });
    }
  });
  return overlaps;
}

/** The parts of `gap` that none of `covered` (sorted by start) covers, in order; e.g. the unexplained rest of a standstill. */
export function uncoveredParts(
  gap: { start: Date; end: Date },
  covered: readonly { start: Date; end: Date }[],
): { start: Date; end: Date }[] {
  const pieces: { start: Date; end: Date }[] = [];
  let cursor = gap.start.getTime();
  for (const c of covered) {
    if (c.start.getTime() >= gap.end.getTime()) break;
    if (c.end.getTime() <= cursor) continue;
    if (c.start.getTime() > cursor) pieces.push({ start: new Date(cursor), end: c.start });
    cursor = Math.max(cursor, c.end.getTime());
  }
  if (cursor < gap.end.getTime()) pieces.push({ start: new Date(cursor), end: gap.end });
  return pieces;
}
