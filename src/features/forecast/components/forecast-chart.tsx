import { useState } from 'react';
import { CartesianGrid, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import { positionClassLabels } from '../../../../shared/cutters';
import { Button } from '../../../components/ui/button';
import { directionSign, formatChainage } from '../../../../shared/domain/chainage';
import { groundColours } from '../../../lib/ground-colours';
import type { Forecast, Geology, GroundType } from '../api';

const HATCH_ID = 'kerfwise-no-stop-hatch';
const ranges = [250, 500, 1000, 2000, null] as const;
const tickSteps = [10, 25, 50, 100, 250, 500, 1000, 2500, 5000, 10000];
type Range = (typeof ranges)[number];

interface Marker {
  chainageM: number;
  positionNumber: number;
  label: string;
  detail: string;
}

function Swatch({ fill, hatch = false }: { fill: string; hatch?: boolean }) {
  return (
    <svg width="28" height="16" aria-hidden="true" className="shrink-0">
      <rect width="28" height="16" fill={fill} stroke="#4f564b" />
      {hatch && <path d="M0 16 L16 0 M8 16 L24 0 M16 16 L28 4" stroke="#1d201c" strokeWidth="1.5" />}
    </svg>
  );
}

function MarkerTooltip({ active, payload }: { active?: boolean; payload?: readonly { payload?: Marker }[] }) {
  const m = payload?.[0]?.payload;
  if (!active || !m) return null;
  return (
    <div className="rounded-md border border-basalt-300 bg-white px-3 py-2 text-caption shadow">
      <p className="font-semibold">
        Position {m.positionNumber}: {m.label}
      </p>
      <p>{m.detail}</p>
    </div>
  );
}

/**
 * The drive ahead along chainage: geology as coloured bands (no-stop sections hatched), where each
 * position reaches its wear limit (P50 circle, P90 diamond) and a line where the machine is now.
 */
export function ForecastChart({
  forecast,
  geology,
  groundTypes,
  driveDirection,
}: {
  forecast: Forecast;
  geology: Geology;
  groundTypes: GroundType[];
  driveDirection: 'increasing' | 'decreasing';
}) {
  const current = forecast.currentChainageM ?? 0;
  const sign = directionSign(driveDirection);
  const remaining = forecast.positions.map((p) => p.p50.remainingM).sort((a, b) => a - b);
  // Start with the shortest range that shows three quarters of the positions.
  const wanted = remaining[Math.floor(remaining.length * 0.75)] ?? 0;
  const [range, setRange] = useState<Range>(ranges.find((r) => r != null && r >= wanted) ?? null);
  const farthestM = Math.max(
    ...forecast.positions.map((p) => Math.max(p.p50.remainingM, p.p90.remainingM)),
    ...geology.sections.map((s) => Math.max((s.chainageFromM - current) * sign, (s.chainageToM - current) * sign)),
    50,
  );
  const aheadM = range ?? farthestM;
  const behindM = aheadM * 0.05;
  const domain: [number, number] = sign > 0 ? [current - behindM, current + aheadM] : [current - aheadM, current + behindM];
  const inDomain = (x: number) => x >= domain[0] - 1e-6 && x <= domain[1] + 1e-6;
  // Ticks on round chainages, at most about six.
  const step = tickSteps.find((t) => (domain[1] - domain[0]) / t <= 6) ?? 20000;
  const xTicks: number[] = [];
  for (let x = Math.ceil(domain[0] / step) * step; x <= domain[1]; x += step) xTicks.push(x);

  const colour = groundColours(groundTypes);
  const name = new Map(groundTypes.map((g) => [g.id, g.name]));
  const sections = geology.sections
    .map((s) => ({ ...s, x1: Math.max(s.chainageFromM, domain[0]), x2: Math.min(s.chainageToM, domain[1]) }))
    .filter((s) => s.x2 > s.x1);
  const shownGrounds = groundTypes.filter((g) => sections.some((s) => s.groundTypeId === g.id));
  const anyNoStop = sections.some((s) => !s.stopAllowed);

  const maxPosition = Math.max(1, ...forecast.positions.map((p) => p.position.positionNumber));
  const strip = Math.max(2, Math.round(maxPosition * 0.1));
  const yStep = maxPosition > 30 ? 10 : 5;
  const yTicks = [1, ...Array.from({ length: Math.floor(maxPosition / yStep) }, (_, i) => (i + 1) * yStep)];
  const markers = (q: 'p50' | 'p90') =>
    forecast.positions
      .map((p): Marker => ({
        chainageM: p[q].chainageM,
        positionNumber: p.position.positionNumber,
        label: `${positionClassLabels[p.position.positionClass]}, ${q === 'p90' ? 'cautious (P90)' : 'central (P50)'}`,
        detail:
          p[q].status === 'over_limit'
            ? 'Over the limit now'
            : p[q].status === 'beyond_known_ground'
              ? `Beyond known ground: past ${formatChainage(p[q].chainageM)}`
              : `Reaches ${p.position.allowableWearMm} mm at ${formatChainage(p[q].chainageM)}, ring ${p[q].ringNumber}`,
      }))
      .filter((m) => inDomain(m.chainageM));
  const p50 = markers('p50');
  const p90 = markers('p90');
  const outside = forecast.positions.length - p90.length;

  return (
    <figure className="space-y-3">
      <div className="flex flex-wrap gap-2" role="group" aria-label="Chainage shown ahead of the machine">
        {ranges.map((r) => (
          <Button key={r ?? 'all'} variant={range === r ? 'primary' : 'secondary'} aria-pressed={range === r} onClick={() => setRange(r)}>
            {r == null ? 'All known ground' : r < 1000 ? `Next ${r} m` : `Next ${r / 1000} km`}
          </Button>
        ))}
      </div>
      <div
        className="h-[30rem] w-full"
        role="img"
        aria-label={`Change-out points along chainage from the machine at ${formatChainage(current)}: ${p90.length} positions reach their cautious limit within the chainage shown.`}
      >
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 28, right: 24, bottom: 8, left: 8 }}>
            <defs>
              <pattern id={HATCH_ID} width="8" height="8" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
                <line x1="0" y1="0" x2="0" y2="8" stroke="#1d201c" strokeWidth="2" strokeOpacity="0.45" />
              </pattern>
            </defs>
            <CartesianGrid stroke="#cdd1ca" strokeDasharray="3 3" />
            <XAxis
              type="number"
              dataKey="chainageM"
              domain={domain}
              allowDataOverflow
              reversed={sign < 0}
              ticks={xTicks}
              tickFormatter={(v: number) => formatChainage(v).replace(/\.0$/, '')}
              stroke="#4f564b"
              fontSize={14}
            />
            <YAxis
              type="number"
              dataKey="positionNumber"
              domain={[-strip, maxPosition + 1]}
              ticks={yTicks}
              stroke="#4f564b"
              fontSize={14}
              width={44}
              label={{ value: 'Position', angle: -90, position: 'insideLeft', fill: '#2c302a', fontSize: 14 }}
            />
            {sections.map((s) => (
              <ReferenceArea
                key={`tint-${s.id}`}
                x1={s.x1}
                x2={s.x2}
                y1={-strip}
                y2={maxPosition + 1}
                fill={colour.get(s.groundTypeId)}
                fillOpacity={0.16}
                stroke="none"
              />
            ))}
            {sections.map((s) => (
              <ReferenceArea
                key={`strip-${s.id}`}
                x1={s.x1}
                x2={s.x2}
                y1={-strip}
                y2={0}
                fill={colour.get(s.groundTypeId)}
                fillOpacity={1}
                stroke="#ffffff"
              />
            ))}
            {sections
              .filter((s) => !s.stopAllowed)
              .map((s) => (
                <ReferenceArea
                  key={`hatch-${s.id}`}
                  x1={s.x1}
                  x2={s.x2}
                  y1={-strip}
                  y2={maxPosition + 1}
                  fill={`url(#${HATCH_ID})`}
                  stroke="#1d201c"
                  strokeDasharray="4 3"
                />
              ))}
            <ReferenceLine
              x={current}
              stroke="#bd4f09"
              strokeWidth={3}
              label={{ value: `Machine ${formatChainage(current)}`, position: 'top', fill: '#973d0c', fontSize: 14, fontWeight: 600 }}
            />
            <Tooltip content={MarkerTooltip} cursor={false} />
            <Scatter
              name="Central (P50) change-out"
              data={p50}
              fill="#ffffff"
              stroke="#3e443b"
              strokeWidth={2}
              shape="circle"
              isAnimationActive={false}
            />
            <Scatter name="Cautious (P90) change-out" data={p90} fill="#1d201c" shape="diamond" isAnimationActive={false} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="space-y-2 text-caption">
        <ul className="flex flex-wrap gap-x-5 gap-y-2" aria-label="Legend">
          <li className="flex items-center gap-2">
            <svg width="16" height="16" aria-hidden="true">
              <path d="M8 1 L15 8 L8 15 L1 8 Z" fill="#1d201c" />
            </svg>
            Cautious (P90) change-out
          </li>
          <li className="flex items-center gap-2">
            <svg width="16" height="16" aria-hidden="true">
              <circle cx="8" cy="8" r="6" fill="#ffffff" stroke="#3e443b" strokeWidth="2" />
            </svg>
            Central (P50) change-out
          </li>
          <li className="flex items-center gap-2">
            <svg width="16" height="16" aria-hidden="true">
              <line x1="8" y1="0" x2="8" y2="16" stroke="#bd4f09" strokeWidth="3" />
            </svg>
            Machine now
          </li>
          {shownGrounds.map((g) => (
            <li key={g.id} className="flex items-center gap-2">
              <Swatch fill={colour.get(g.id) ?? '#ffffff'} />
              {name.get(g.id)}
            </li>
          ))}
          {anyNoStop && (
            <li className="flex items-center gap-2">
              <Swatch fill="#ffffff" hatch />
              No stop allowed
            </li>
          )}
        </ul>
        {outside > 0 && (
          <p className="text-basalt-600">
            {outside} position{outside === 1 ? '' : 's'} reach{outside === 1 ? 'es' : ''} the cautious limit beyond the chainage shown.
          </p>
        )}
      </figcaption>
    </figure>
  );
}
