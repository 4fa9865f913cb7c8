/**
 * The demo drive's history, simulated: an invented hard-rock headrace tunnel bored for six months.
 * Deterministic (seeded), so every fresh demo is the same. Wear grows with the distance each disc
 * rolls (Archard; DOMAIN.md §1–2) at a true rate per ground type that the wear fit should find
 * again; fitters measure it with gauge scatter, change discs near their limit or when damaged,
 * and the workshop rebuilds them. Nothing here is real data.
 */
import seedrandom from 'seedrandom';
import type { DiscCondition, PositionClass } from '../../../shared/cutters';
import { rolledKm } from '../../../shared/domain/rolled-distance';

export interface DemoGroundType {
  key: string;
  name: string;
  description: string;
  ucsMpa: number;
  cai: number;
  quartzPct: number;
  /** True wear rate of a face disc, mm per km rolled (the simulation's hidden truth). */
  trueRateMmPerKm: number;
  /** Typical penetration, mm/rev. */
  penetrationMmPerRev: number;
  /** Sudden failures (chipped, cracked, flat spot…) per 1,000 km rolled. */
  failuresPer1000Km: number;
}

export const demoGroundTypes: DemoGroundType[] = [
  {
    key: 'gneiss',
    name: 'Banded gneiss',
    description: 'Grey banded granitic gneiss, massive to blocky',
    ucsMpa: 165,
    cai: 4.1,
    quartzPct: 32,
    trueRateMmPerKm: 0.034,
    penetrationMmPerRev: 7.5,
    failuresPer1000Km: 1.2,
  },
  {
    key: 'schist',
    name: 'Mica schist',
    description: 'Foliated mica schist with thin quartz lenses',
    ucsMpa: 75,
    cai: 2.2,
    quartzPct: 18,
    trueRateMmPerKm: 0.009,
    penetrationMmPerRev: 11,
    failuresPer1000Km: 0.5,
  },
  {
    key: 'quartzite',
    name: 'Quartzite band',
    description: 'Fine-grained quartzite, very hard and abrasive',
    ucsMpa: 230,
    cai: 5.3,
    quartzPct: 85,
    trueRateMmPerKm: 0.058,
    penetrationMmPerRev: 4.5,
    failuresPer1000Km: 3.5,
  },
  {
    key: 'crushed',
    name: 'Crushed zone',
    description: 'Fault breccia and gouge, blocky and wet',
    ucsMpa: 25,
    cai: 1.4,
    quartzPct: 20,
    trueRateMmPerKm: 0.006,
    penetrationMmPerRev: 13,
    failuresPer1000Km: 4,
  },
  {
    key: 'metasandstone',
    name: 'Metasandstone',
    description: 'Massive metasandstone (ahead; no cutter data yet)',
    ucsMpa: 190,
    cai: 3.7,
    quartzPct: 60,
    trueRateMmPerKm: 0.03,
    penetrationMmPerRev: 6,
    failuresPer1000Km: 1.5,
  },
];

export interface DemoSection {
  fromM: number;
  toM: number;
  groundKey: string;
  waterHeadM: number;
  stopAllowed: boolean;
  stopReason: string;
}

/** Chainage 1+250 to 8+900, increasing. The machine stands near 5+000 at the end of the history. */
export const demoSections: DemoSection[] = [
  { fromM: 1250, toM: 1900, groundKey: 'schist', waterHeadM: 12, stopAllowed: true, stopReason: '' },
  { fromM: 1900, toM: 2650, groundKey: 'gneiss', waterHeadM: 18, stopAllowed: true, stopReason: '' },
  { fromM: 2650, toM: 2790, groundKey: 'crushed', waterHeadM: 22, stopAllowed: false, stopReason: 'Fault zone: unstable face, no stop' },
  { fromM: 2790, toM: 3400, groundKey: 'gneiss', waterHeadM: 20, stopAllowed: true, stopReason: '' },
  { fromM: 3400, toM: 3620, groundKey: 'quartzite', waterHeadM: 24, stopAllowed: true, stopReason: '' },
  { fromM: 3620, toM: 4300, groundKey: 'schist', waterHeadM: 26, stopAllowed: true, stopReason: '' },
  { fromM: 4300, toM: 5150, groundKey: 'gneiss', waterHeadM: 28, stopAllowed: true, stopReason: '' },
  { fromM: 5150, toM: 5330, groundKey: 'quartzite', waterHeadM: 30, stopAllowed: true, stopReason: '' },
  {
    fromM: 5330,
    toM: 5420,
    groundKey: 'gneiss',
    waterHeadM: 34,
    stopAllowed: false,
    stopReason: 'Beneath the village of the valley floor: no stop',
  },
  { fromM: 5420, toM: 5600, groundKey: 'gneiss', waterHeadM: 34, stopAllowed: true, stopReason: '' },
  {
    fromM: 5600,
    toM: 6400,
    groundKey: 'metasandstone',
    waterHeadM: 38,
    stopAllowed: true,
    stopReason: 'High water head under the valley: stops need compressed air',
  },
  {
    fromM: 6400,
    toM: 6520,
    groundKey: 'crushed',
    waterHeadM: 40,
    stopAllowed: false,
    stopReason: 'Fault zone under the river bed: no stop',
  },
  { fromM: 6520, toM: 7700, groundKey: 'metasandstone', waterHeadM: 25, stopAllowed: true, stopReason: '' },
  { fromM: 7700, toM: 8900, groundKey: 'gneiss', waterHeadM: 15, stopAllowed: true, stopReason: '' },
];

export interface DemoPosition {
  number: number;
  trackRadiusMm: number;
  positionClass: PositionClass;
  discSizeIn: number;
  tiltDeg: number | null;
  wearLimitMm: number;
  twinDisc: boolean;
  angleDeg: number;
}

/**
 * A plausible 17″ layout for a 6.20 m bore: 4 twin centre hubs, 34 face discs at about 80 mm
 * spacing, 8 gauge discs tilted progressively towards the bore wall. Angles follow a spiral
 * (137.5° apart) so neighbouring tracks sit on different spokes.
 */
export function demoLayout(): DemoPosition[] {
  const list: DemoPosition[] = [];
  const add = (trackRadiusMm: number, positionClass: PositionClass, tiltDeg: number | null, wearLimitMm: number, twinDisc = false) => {
    const number = list.length + 1;
    list.push({
      number,
      trackRadiusMm,
      positionClass,
      discSizeIn: 17,
      tiltDeg,
      wearLimitMm,
      twinDisc,
      angleDeg: Math.round(((number - 1) * 137.5) % 360),
    });
  };
  for (let i = 0; i < 4; i++) add(50 + i * 95, 'centre', null, 25, true);
  for (let i = 0; i < 34; i++) add(480 + i * 70, 'face', null, 25);
  for (let i = 0; i < 8; i++) add(2810 + i * 36, 'gauge', 8 + i * 8, 15);
  return list;
}

/** Wear multiplier per class relative to face discs (the simulation's truth; common practice, no source, that gauge discs wear faster). */
export const demoClassFactors: Record<PositionClass, number> = { centre: 0.8, face: 1, gauge: 1.6 };

export interface SimStroke {
  ringNumber: number;
  startTime: Date;
  endTime: Date;
  chainageStartM: number;
  chainageEndM: number;
  revolutions: number | null;
  penetrationMmPerRev: number;
  rpm: number;
  thrustKn: number;
  torqueKnm: number;
}

export interface SimEntry {
  positionNumber: number;
  wearMm: number;
  conditions: DiscCondition[];
  changed: boolean;
  removedSerial: string;
  fittedSerial: string | null;
  reason: string | null;
}

export interface SimRound {
  startedAt: Date;
  chainageM: number;
  ringNumber: number;
  crew: string;
  entries: SimEntry[];
}

export interface SimCutterEvent {
  serial: string;
  at: Date;
  kind: 'received' | 'fitted' | 'removed' | 'rebuilt' | 'scrapped';
  positionNumber: number | null;
  details: Record<string, unknown>;
}

export interface SimFitting {
  serial: string;
  positionNumber: number;
  fittedAt: Date;
  fittedChainageM: number;
  fittedRing: number;
  removedAt: Date | null;
  removedChainageM: number | null;
  removedRing: number | null;
  reason: string | null;
  conditions: DiscCondition[] | null;
}

export interface SimCutter {
  serial: string;
  status: 'in_store' | 'fitted' | 'workshop' | 'scrapped';
  rebuildCount: number;
}

export interface DemoDrive {
  positions: DemoPosition[];
  strokes: SimStroke[];
  rounds: SimRound[];
  cutters: SimCutter[];
  fittings: SimFitting[];
  events: SimCutterEvent[];
}

const RING_M = 1.5;
const START = Date.UTC(2026, 5, 1, 4, 0); // 2026-06-01 06:00 in the site's summer time
const END = Date.UTC(2026, 10, 30, 18, 0); // 2026-11-30
const STORE_SIZE = 210;
const CHANGE_MARGIN_MM = 2.5; // fitters change a disc within 2.5 mm of its limit (common practice, no source)
const WORKSHOP_DAYS = 9;
const MAX_REBUILDS = 4;

/** Simulates the drive up to `END`. Pure and deterministic for a given seed. */
export function simulateDrive(seed = 'eskerholt-north'): DemoDrive {
  const rand = seedrandom(seed);
  const gauss = () => Math.sqrt(-2 * Math.log(rand() || 1e-12)) * Math.cos(2 * Math.PI * rand());
  const ground = new Map(demoGroundTypes.map((g) => [g.key, g]));
  const groundAt = (m: number) => ground.get(demoSections.find((s) => m >= s.fromM && m < s.toM)?.groundKey ?? 'gneiss')!;
  const stopAllowedAt = (m: number) => demoSections.find((s) => m >= s.fromM && m < s.toM)?.stopAllowed ?? true;

  const layout = demoLayout();
  const serialName = (n: number) => `C17-${String(n).padStart(4, '0')}`;
  const cutters = new Map<string, SimCutter>();
  const events: SimCutterEvent[] = [];
  const fittingsOut: SimFitting[] = [];
  const store: string[] = [];
  const workshop: { serial: string; back: number; needs: DiscCondition[] }[] = [];
  for (let n = 1; n <= layout.length + STORE_SIZE; n++) {
    const serial = serialName(n);
    cutters.set(serial, { serial, status: 'in_store', rebuildCount: 0 });
    events.push({ serial, at: new Date(START - 7 * 86400_000), kind: 'received', positionNumber: null, details: {} });
    store.push(serial);
  }
  // Each position: the disc on it, its true wear, its last measured wear, a pending sudden failure.
  const state = new Map<
    number,
    { serial: string; fitting: SimFitting; trueWearMm: number; measuredMm: number; damage: DiscCondition | null }
  >();
  const fit = (p: DemoPosition, at: number, chainageM: number, ring: number) => {
    const serial = store.shift();
    if (!serial) throw new Error('demo store ran out of cutters');
    const fitting: SimFitting = {
      serial,
      positionNumber: p.number,
      fittedAt: new Date(at),
      fittedChainageM: chainageM,
      fittedRing: ring,
      removedAt: null,
      removedChainageM: null,
      removedRing: null,
      reason: null,
      conditions: null,
    };
    fittingsOut.push(fitting);
    cutters.get(serial)!.status = 'fitted';
    events.push({ serial, at: new Date(at), kind: 'fitted', positionNumber: p.number, details: { chainageM, ringNumber: ring } });
    state.set(p.number, { serial, fitting, trueWearMm: 0, measuredMm: 0, damage: null });
  };
  for (const p of layout) fit(p, START - 86400_000, 1250, 0);

  const strokes: SimStroke[] = [];
  const rounds: SimRound[] = [];
  let t = START;
  let chainage = 1250;
  let ring = 0;
  let sinceRoundM = 0;
  const crews = ['Crew A (Vella)', 'Crew B (Okafor)', 'Crew C (Lindqvist)'];

  const workshopPass = (now: number) => {
    for (let i = workshop.length - 1; i >= 0; i--) {
      const w = workshop[i];
      if (w.back > now) continue;
      workshop.splice(i, 1);
      const c = cutters.get(w.serial)!;
      if (c.rebuildCount >= MAX_REBUILDS || w.needs.includes('hub_damage')) {
        c.status = 'scrapped';
        events.push({
          serial: w.serial,
          at: new Date(w.back),
          kind: 'scrapped',
          positionNumber: null,
          details: { reason: w.needs.includes('hub_damage') ? 'Hub damaged' : `Worn out after ${c.rebuildCount} rebuilds` },
        });
      } else {
        c.status = 'in_store';
        c.rebuildCount += 1;
        events.push({
          serial: w.serial,
          at: new Date(w.back),
          kind: 'rebuilt',
          positionNumber: null,
          details: {
            outcome: 'rebuilt',
            newRing: true,
            newSeals: w.needs.includes('seal_leaking'),
            newBearings: w.needs.includes('bearing_fault'),
          },
        });
        store.push(w.serial);
      }
    }
  };

  const inspect = (at: number) => {
    const round: SimRound = {
      startedAt: new Date(at),
      chainageM: Math.round(chainage * 10) / 10,
      ringNumber: ring,
      crew: crews[rounds.length % crews.length],
      entries: [],
    };
    for (const p of layout) {
      const s = state.get(p.number)!;
      // Gauge scatter about ±0.4 mm; a measurement never reads below the last one of the same disc.
      const read = Math.max(s.measuredMm, Math.round(Math.max(0, s.trueWearMm + 0.4 * gauss()) * 10) / 10);
      s.measuredMm = read;
      const conditions: DiscCondition[] = s.damage ? [s.damage] : ['even_wear'];
      const due = read >= p.wearLimitMm - CHANGE_MARGIN_MM || s.damage !== null;
      const entry: SimEntry = {
        positionNumber: p.number,
        wearMm: read,
        conditions,
        changed: false,
        removedSerial: s.serial,
        fittedSerial: null,
        reason: null,
      };
      if (due && store.length > 0) {
        const reason = s.damage ? `Damaged: ${s.damage.replace('_', ' ')}` : 'Worn to the change limit';
        Object.assign(s.fitting, { removedAt: new Date(at), removedChainageM: round.chainageM, removedRing: ring, reason, conditions });
        cutters.get(s.serial)!.status = 'workshop';
        events.push({
          serial: s.serial,
          at: new Date(at),
          kind: 'removed',
          positionNumber: p.number,
          details: { reason, conditions, wearMm: read, chainageM: round.chainageM, ringNumber: ring },
        });
        workshop.push({ serial: s.serial, back: at + WORKSHOP_DAYS * 86400_000, needs: conditions });
        fit(p, at, round.chainageM, ring);
        Object.assign(entry, { changed: true, fittedSerial: state.get(p.number)!.serial, reason });
      }
      round.entries.push(entry);
    }
    rounds.push(round);
  };

  while (t < END) {
    workshopPass(t);
    const g = groundAt(chainage + RING_M / 2);
    const penetration = Math.max(2.5, g.penetrationMmPerRev * (1 + 0.12 * gauss()));
    const rpm = Math.round((5.2 + 0.4 * rand()) * 10) / 10;
    const revolutions = (RING_M * 1000) / penetration;
    const boreMin = revolutions / rpm;
    const start = t;
    const end = start + boreMin * 60_000;
    ring += 1;
    strokes.push({
      ringNumber: ring,
      startTime: new Date(start),
      endTime: new Date(end),
      chainageStartM: chainage,
      chainageEndM: chainage + RING_M,
      // About one ring in twenty comes without the revolution counter (logger gap): penetration stands in.
      revolutions: rand() < 0.05 ? null : Math.round(revolutions * 10) / 10,
      penetrationMmPerRev: Math.round(penetration * 100) / 100,
      rpm,
      thrustKn: Math.round(9000 + g.ucsMpa * 25 + 800 * gauss()),
      torqueKnm: Math.round(1800 + 1200 * rand()),
    });
    for (const p of layout) {
      const s = state.get(p.number)!;
      const km = rolledKm(p.trackRadiusMm / 1000, revolutions);
      s.trueWearMm += g.trueRateMmPerKm * demoClassFactors[p.positionClass] * km;
      if (!s.damage && rand() < (g.failuresPer1000Km * km) / 1000) {
        const kinds: DiscCondition[] = ['chipped_ring', 'flat_spot', 'cracked_ring', 'seal_leaking', 'bearing_fault', 'hub_damage'];
        s.damage = kinds[Math.floor(rand() * kinds.length * 0.999)];
      }
    }
    chainage += RING_M;
    sinceRoundM += RING_M;
    // Ring build and other stoppages between strokes (35–70 min), a longer stop now and then.
    t = end + (35 + 35 * rand()) * 60_000 + (rand() < 0.02 ? (4 + 8 * rand()) * 3600_000 : 0);
    // Inspection rounds every 45–60 m, but never where the ground does not allow a stop.
    if (sinceRoundM >= 45 + 15 * rand() && stopAllowedAt(chainage)) {
      inspect(t);
      sinceRoundM = 0;
      t += (5 + 2 * rand()) * 3600_000;
    }
  }
  return { positions: layout, strokes, rounds, cutters: [...cutters.values()], fittings: fittingsOut, events };
}
