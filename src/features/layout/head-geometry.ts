/**
 * Where each position sits on the cutterhead picture. Angles are degrees clockwise from the top,
 * seen from the face; the track radius is the planner's, in mm.
 *
 * Even layout (for positions with no angle entered): the positions are taken from the centre
 * outward (by track radius, then number) and each takes, in whole degrees, the angle that keeps
 * it farthest from every disc already placed — entered angles first, then the ones laid out
 * before it. Near the centre this puts neighbouring tracks on opposite sides; further out it
 * fills the widest gap on each track circle, so discs spread round the head instead of piling
 * up on one spoke. The result depends only on the layout, so the picture and the "lay out
 * angles evenly" button always agree.
 */

export interface HeadSlot {
  trackRadiusMm: number;
  angleDeg: number | null;
}

/** Point (mm, SVG axes: x right, y down) of a disc at `radiusMm` and `angleDeg` (clockwise from the top). */
export function discPointMm(radiusMm: number, angleDeg: number): { x: number; y: number } {
  const a = (angleDeg * Math.PI) / 180;
  return { x: radiusMm * Math.sin(a), y: -radiusMm * Math.cos(a) };
}

/** Angle in degrees for every slot, in the same order: the entered one, or one laid out evenly (see above). */
export function layOutAnglesDeg(slots: readonly HeadSlot[], numbers: readonly number[]): number[] {
  const angles = slots.map((s) => s.angleDeg);
  const placed = slots.flatMap((s) => (s.angleDeg == null ? [] : [discPointMm(s.trackRadiusMm, s.angleDeg)]));
  const open = slots
    .map((s, i) => ({ i, r: s.trackRadiusMm, n: numbers[i] ?? i }))
    .filter(({ i }) => angles[i] == null)
    .sort((a, b) => a.r - b.r || a.n - b.n);
  for (const { i, r } of open) {
    let best = 0;
    let bestGap = -1;
    for (let deg = 0; deg < 360; deg++) {
      const p = discPointMm(r, deg);
      let gap = Infinity;
      for (const q of placed) gap = Math.min(gap, (p.x - q.x) ** 2 + (p.y - q.y) ** 2);
      if (gap > bestGap + 1e-9) {
        bestGap = gap;
        best = deg;
      }
    }
    angles[i] = best;
    placed.push(discPointMm(r, best));
  }
  return angles as number[];
}

/** For each point, the distance (mm) to its nearest other point (Infinity when it is alone). */
export function nearestSpacingMm(points: readonly { x: number; y: number }[]): number[] {
  return points.map((p, i) => points.reduce((min, q, j) => (j === i ? min : Math.min(min, Math.hypot(p.x - q.x, p.y - q.y))), Infinity));
}

/**
 * Radius (mm) to draw each disc at: 0.45 of the distance to its nearest neighbour, so two
 * neighbours never touch, kept between 1/40 and 1/16 of the head radius `headRadiusMm`.
 */
export function discRadiiMm(points: readonly { x: number; y: number }[], headRadiusMm: number): number[] {
  return nearestSpacingMm(points).map((d) => Math.min(headRadiusMm / 16, Math.max(headRadiusMm / 40, d * 0.45)));
}
