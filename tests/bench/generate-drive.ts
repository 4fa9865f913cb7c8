/**
 * A synthetic 10 km drive for the benchmark (invented, deterministic): 80 positions, 40 geology
 * sections in 5 ground types, about 7,000 strokes of 1.5 m, and about 3,000 inspections.
 */
import seedrandom from 'seedrandom';

export const BENCH_RINGS = 6700;
export const BENCH_POSITIONS = 80;
export const BENCH_SECTIONS = 40;

export function benchLayout() {
  return Array.from({ length: BENCH_POSITIONS }, (_, k) => {
    const positionClass = k < 4 ? ('centre' as const) : k < 70 ? ('face' as const) : ('gauge' as const);
    const trackRadiusMm = k < 4 ? 60 + k * 100 : k < 70 ? 480 + (k - 4) * 57 : 4260 + (k - 70) * 22;
    return {
      number: k + 1,
      trackRadiusMm,
      positionClass,
      discSizeIn: 19,
      tiltDeg: positionClass === 'gauge' ? 10 + (k - 70) * 6 : null,
      wearLimitMm: positionClass === 'gauge' ? 15 : 25,
      twinDisc: k < 4,
      angleDeg: null,
    };
  });
}

export function benchGeology(startM: number) {
  return Array.from({ length: BENCH_SECTIONS }, (_, i) => ({
    fromM: startM + i * 260,
    toM: startM + (i + 1) * 260,
    ground: i % 5,
    stopAllowed: i % 7 !== 3,
  }));
}

export const benchGroundTypes = [
  { name: 'Bench granite', cai: 4.2 },
  { name: 'Bench schist', cai: 2.0 },
  { name: 'Bench quartzite', cai: 5.4 },
  { name: 'Bench limestone', cai: 1.1 },
  { name: 'Bench sandstone', cai: 3.5 },
];

/** Advance-log rows as a machine export would give them: CSV text and the same rows as values. */
export function benchStrokes(fromRing: number, count: number, startM: number, startMs: number) {
  const rand = seedrandom(`bench-${fromRing}`);
  const rows = [];
  let t = startMs;
  for (let i = 0; i < count; i++) {
    const ring = fromRing + i;
    const chainage = startM + (ring - 1) * 1.5;
    const p = 5 + 6 * rand();
    const revolutions = 1500 / p;
    const end = t + (revolutions / 5.5) * 60_000;
    rows.push({
      ringNumber: ring,
      startTime: new Date(t),
      endTime: new Date(end),
      chainageStartM: chainage,
      chainageEndM: chainage + 1.5,
      revolutions: Math.round(revolutions * 10) / 10,
      penetrationMmPerRev: Math.round(p * 100) / 100,
      rpm: 5.5,
      thrustKn: Math.round(11000 + 3000 * rand()),
      torqueKnm: Math.round(2000 + 1500 * rand()),
    });
    t = end + 40 * 60_000;
  }
  return rows;
}

/** A stroke's values in the advance log's column order (ring, times in UTC, chainages, machine data). */
export function strokeValues(r: ReturnType<typeof benchStrokes>[number]) {
  return [
    r.ringNumber,
    r.startTime.toISOString(),
    r.endTime.toISOString(),
    r.chainageStartM,
    r.chainageEndM,
    r.revolutions,
    r.penetrationMmPerRev,
    r.rpm,
    r.thrustKn,
    r.torqueKnm,
  ];
}

export function strokesCsv(rows: ReturnType<typeof benchStrokes>): string {
  const header = 'ring,start time,end time,chainage start,chainage end,revolutions,penetration,rpm,thrust,torque';
  return [header, ...rows.map((r) => strokeValues(r).join(','))].join('\n') + '\n';
}
