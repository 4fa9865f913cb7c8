import { describe, expect, it } from 'vitest';
import { discPointMm, discRadiiMm, layOutAnglesDeg, nearestSpacingMm } from '../../src/features/layout/head-geometry';

describe('discPointMm', () => {
  it('measures angles clockwise from the top in SVG axes (y down)', () => {
    // derived: x = r·sin θ, y = −r·cos θ
    const top = discPointMm(1000, 0);
    expect(top.x).toBeCloseTo(0, 9);
    expect(top.y).toBeCloseTo(-1000, 9);
    const right = discPointMm(1000, 90);
    expect(right.x).toBeCloseTo(1000, 9);
    expect(right.y).toBeCloseTo(0, 9);
    const bottomLeft = discPointMm(2000, 225);
    expect(bottomLeft.x).toBeCloseTo(-2000 / Math.SQRT2, 9);
    expect(bottomLeft.y).toBeCloseTo(2000 / Math.SQRT2, 9);
  });
});

describe('nearestSpacingMm', () => {
  it('gives each point the distance to its nearest neighbour', () => {
    // derived: 3-4-5 triangle; (0,0)–(3,0) = 3, (3,0)–(3,4) = 4, (0,0)–(3,4) = 5
    expect(
      nearestSpacingMm([
        { x: 0, y: 0 },
        { x: 3, y: 0 },
        { x: 3, y: 4 },
      ]),
    ).toEqual([3, 3, 4]);
    expect(nearestSpacingMm([{ x: 1, y: 1 }])).toEqual([Infinity]);
  });
});

describe('layOutAnglesDeg', () => {
  const open = (r: number) => ({ trackRadiusMm: r, angleDeg: null });

  it('keeps entered angles and lays out only the missing ones', () => {
    const angles = layOutAnglesDeg([{ trackRadiusMm: 500, angleDeg: 37.5 }, open(800), { trackRadiusMm: 1200, angleDeg: 300 }], [1, 2, 3]);
    expect(angles[0]).toBe(37.5);
    expect(angles[2]).toBe(300);
    expect(Number.isInteger(angles[1])).toBe(true);
  });

  it('puts the first disc at the top and the next on the opposite side', () => {
    // derived: with nothing placed every angle ties, the first (0°) wins; the point of a circle farthest
    // from a point at angle 0 is at 180° (distance r1 + r2).
    expect(layOutAnglesDeg([open(150), open(60)], [2, 1])).toEqual([180, 0]);
  });

  it('treats entered angles as taken: a disc on the same track goes opposite one entered at 0°', () => {
    expect(layOutAnglesDeg([{ trackRadiusMm: 1000, angleDeg: 0 }, open(1000)], [1, 2])).toEqual([0, 180]);
  });

  it('gives each position the same angle whatever order the rows come in', () => {
    const slots = [open(60), open(900), open(1800), open(2700), open(3050)];
    const numbers = [1, 2, 3, 4, 5];
    const forward = layOutAnglesDeg(slots, numbers);
    const backward = layOutAnglesDeg([...slots].reverse(), [...numbers].reverse());
    expect([...backward].reverse()).toEqual(forward);
  });

  it('spreads a full 6.2 m head so that no two drawn discs overlap', () => {
    // A plausible layout (common practice, no source): twin centre hubs at 60–330 mm, face discs
    // every 85 mm, gauge discs every 55 mm near the 3100 mm bore radius.
    const radii = [60, 150, 240, 330];
    for (let r = 420; r <= 2800; r += 85) radii.push(r);
    radii.push(2850, 2905, 2960, 3015, 3070);
    const angles = layOutAnglesDeg(
      radii.map(open),
      radii.map((_, i) => i + 1),
    );
    const points = radii.map((r, i) => discPointMm(r, angles[i]));
    // derived: the hubs at 60 and 150 mm can be at most 60 + 150 = 210 mm apart; the layout reaches it.
    expect(Math.min(...nearestSpacingMm(points))).toBeCloseTo(210, 6);
    // derived: the picture draws a disc at most R/16 = 193.75 mm in radius; face and gauge discs keep
    // at least 2 × 193.75 = 387.5 mm from each other, room for two discs of full size.
    expect(Math.min(...nearestSpacingMm(points.slice(4)))).toBeGreaterThanOrEqual(387.5);
    // derived: two drawn discs do not overlap when their centres are further apart than the sum of their radii.
    const drawn = discRadiiMm(points, 3100);
    for (let i = 0; i < points.length; i++) {
      for (let j = i + 1; j < points.length; j++) {
        expect(Math.hypot(points[i].x - points[j].x, points[i].y - points[j].y)).toBeGreaterThan(drawn[i] + drawn[j]);
      }
    }
  });
});
