import { useId, useMemo, type KeyboardEvent } from 'react';
import { useNavigate } from 'react-router';
import { positionClassLabels, wearState } from '../../../../shared/cutters';
import { paths } from '../../../config/paths';
import type { LayoutPosition } from '../api';
import { discPointMm, discRadiiMm, layOutAnglesDeg } from '../head-geometry';

/**
 * Kerfwise's wear ramp, "straw to umber": one hue family whose lightness falls steadily
 * (CIE L* ≈ 93 → 79 → 56 → 32 → 12), so the order reads in grey scale and for every kind of
 * colour blindness. It is deliberately not a red/green traffic light. Over the limit also gets a
 * mark that needs no colour: a heavy ring and a "!" badge.
 */
const ramp = [
  { upTo: 0.25, fill: '#f4ecc8', text: '#1d201c', label: 'under 25 %' },
  { upTo: 0.5, fill: '#e3c06a', text: '#1d201c', label: '25–50 %' },
  { upTo: 0.75, fill: '#b9772f', text: '#ffffff', label: '50–75 %' },
  { upTo: 1, fill: '#7a3b1d', text: '#ffffff', label: '75–100 %' },
] as const;
const overLimitFill = '#2e1a14';
const ink = '#1d201c'; // basalt-900
const focusRing = '#e0660f'; // ember-500, the focus colour everywhere in Kerfwise

export type WearBand =
  | { kind: 'empty'; label: string }
  | { kind: 'unmeasured'; label: string }
  | { kind: 'measured'; label: string; fill: string; text: string }
  | { kind: 'over'; label: string };

/** How a position is drawn: no cutter, not measured since fitted, a band of the ramp, or over its limit. */
export function wearBand(p: Pick<LayoutPosition, 'current' | 'lastWearMm' | 'wearLimitMm'>): WearBand {
  if (!p.current) return { kind: 'empty', label: 'No cutter fitted' };
  const { fraction, overLimit } = wearState(p.lastWearMm, p.wearLimitMm);
  if (fraction == null) return { kind: 'unmeasured', label: 'Not measured since fitted' };
  if (overLimit) return { kind: 'over', label: 'Over the limit' };
  const step = ramp.find((r) => fraction < r.upTo) ?? ramp[ramp.length - 1];
  return { kind: 'measured', label: `${step.label} of the limit`, fill: step.fill, text: step.text };
}

/** One disc: fill by band, number inside, and the non-colour marks. Drawn in SVG user units. */
function Disc({
  band,
  x,
  y,
  size,
  label,
  hatchId,
}: {
  band: WearBand;
  x: number;
  y: number;
  size: number;
  label?: string;
  hatchId: string;
}) {
  const fill =
    band.kind === 'measured' ? band.fill : band.kind === 'over' ? overLimitFill : band.kind === 'empty' ? `url(#${hatchId})` : '#ffffff';
  const text = band.kind === 'measured' ? band.text : band.kind === 'over' ? '#ffffff' : ink;
  const fontSize = label && label.length > 2 ? size * 0.72 : size * 0.95;
  return (
    <>
      {band.kind === 'over' && <circle cx={x} cy={y} r={size * 1.2} fill="none" stroke={ink} strokeWidth={size * 0.24} />}
      <circle
        cx={x}
        cy={y}
        r={size}
        fill={fill}
        stroke={ink}
        strokeWidth={size * (band.kind === 'over' ? 0.14 : 0.09)}
        strokeDasharray={
          band.kind === 'unmeasured' ? `${size * 0.32} ${size * 0.2}` : band.kind === 'empty' ? `${size * 0.08} ${size * 0.22}` : undefined
        }
      />
      {label && (
        <text
          x={x}
          y={y}
          fill={text}
          fontSize={fontSize}
          fontWeight={700}
          textAnchor="middle"
          dominantBaseline="central"
          pointerEvents="none"
        >
          {label}
        </text>
      )}
      {band.kind === 'over' && (
        <g pointerEvents="none">
          <circle cx={x + size * 0.95} cy={y - size * 0.95} r={size * 0.5} fill="#ffffff" stroke={ink} strokeWidth={size * 0.1} />
          <text
            x={x + size * 0.95}
            y={y - size * 0.95}
            fill={ink}
            fontSize={size * 0.75}
            fontWeight={700}
            textAnchor="middle"
            dominantBaseline="central"
          >
            !
          </text>
        </g>
      )}
    </>
  );
}

function Hatch({ id, scale }: { id: string; scale: number }) {
  return (
    <pattern id={id} patternUnits="userSpaceOnUse" width={scale} height={scale} patternTransform="rotate(45)">
      <rect width={scale} height={scale} fill="#e6e8e4" />
      <line x1={0} y1={0} x2={0} y2={scale} stroke="#838b7e" strokeWidth={scale * 0.35} />
    </pattern>
  );
}

/**
 * The forecast view on the same ramp: fewer metres left before the cautious (P90) change-out is
 * darker; a position over its limit keeps the ring and "!" mark.
 */
const remainingSteps = [
  { atLeastM: 1000, label: '1,000 m or more left' },
  { atLeastM: 300, label: '300–1,000 m left' },
  { atLeastM: 100, label: '100–300 m left' },
  { atLeastM: 0, label: 'under 100 m left' },
] as const;

export function remainingBand(r: { remainingM: number; status: string } | undefined): WearBand {
  if (!r) return { kind: 'unmeasured', label: 'No forecast' };
  if (r.status === 'over_limit') return { kind: 'over', label: 'Over the limit' };
  const i = remainingSteps.findIndex((s) => r.remainingM >= s.atLeastM);
  const step = ramp[Math.max(0, i)];
  return { kind: 'measured', label: remainingSteps[Math.max(0, i)].label, fill: step.fill, text: step.text };
}

export const remainingLegend: WearBand[] = [
  ...remainingSteps.map((s, i) => ({ kind: 'measured' as const, label: s.label, fill: ramp[i].fill, text: ramp[i].text })),
  { kind: 'over', label: 'Over the limit' },
  { kind: 'unmeasured', label: 'No forecast' },
];

const legend: WearBand[] = [
  ...ramp.map((r) => ({ kind: 'measured' as const, label: `${r.label} of the limit`, fill: r.fill, text: r.text })),
  { kind: 'over', label: 'Over the limit' },
  { kind: 'unmeasured', label: 'Not measured since fitted' },
  { kind: 'empty', label: 'No cutter fitted' },
];

/** The key to the picture, in words beside each mark. */
export function WearLegend({ items = legend }: { items?: WearBand[] }) {
  const hatchId = `legend-hatch-${useId().replace(/[^a-zA-Z0-9]/g, '')}`;
  return (
    <ul className="grid gap-x-4 gap-y-1 text-caption sm:grid-cols-2" aria-label="Key to the cutterhead picture">
      {items.map((band) => (
        <li key={band.label} className="flex items-center gap-2">
          <svg viewBox="-16 -16 32 32" className="size-7 shrink-0" aria-hidden="true">
            <defs>
              <Hatch id={hatchId} scale={4} />
            </defs>
            <Disc band={band} x={0} y={0} size={9} hatchId={hatchId} />
          </svg>
          <span>{band.label}</span>
        </li>
      ))}
    </ul>
  );
}

interface CutterheadPictureProps {
  projectId: string;
  /** Excavated diameter of the drive (m): the outer circle of the picture. */
  excavatedDiameterM: number;
  positions: LayoutPosition[];
  /** Colours by something else than wear now (e.g. the forecast); wear now when absent. */
  bandOf?: (p: LayoutPosition) => WearBand;
}

/**
 * The cutterhead seen from the face: every position at its track radius and angle (entered, or
 * laid out evenly — see head-geometry.ts), coloured by wear as a fraction of its limit, its
 * number on the disc. Each disc is a link (click, or Tab then Enter) to the position's page.
 */
export function CutterheadPicture({ projectId, excavatedDiameterM, positions, bandOf = wearBand }: CutterheadPictureProps) {
  const navigate = useNavigate();
  const hatchId = `head-hatch-${useId().replace(/[^a-zA-Z0-9]/g, '')}`;
  const headRadiusMm = (excavatedDiameterM * 1000) / 2;
  const discs = useMemo(() => {
    const angles = layOutAnglesDeg(
      positions,
      positions.map((p) => p.number),
    );
    const points = positions.map((p, i) => discPointMm(p.trackRadiusMm, angles[i]));
    const sizes = discRadiiMm(points, headRadiusMm);
    return positions.map((p, i) => {
      const size = sizes[i];
      return { p, ...points[i], angleDeg: angles[i], size, band: bandOf(p) };
    });
  }, [positions, headRadiusMm, bandOf]);

  const pad = headRadiusMm * 0.1;
  const extent = headRadiusMm + pad;
  const guideRadiiM = Array.from({ length: Math.floor(headRadiusMm / 1000) }, (_, i) => i + 1).filter((m) => m * 1000 < headRadiusMm - 150);
  const open = (positionId: string) => navigate(paths.position(projectId, positionId));
  const onKey = (e: KeyboardEvent, positionId: string) => {
    if (e.key === 'Enter') {
      e.preventDefault();
      open(positionId);
    }
  };

  return (
    <svg
      viewBox={`${-extent} ${-extent} ${2 * extent} ${2 * extent}`}
      className="mx-auto block h-auto w-full max-w-[40rem] select-none"
      role="group"
      aria-label={`Cutterhead seen from the face, ${positions.length} positions`}
    >
      <defs>
        <Hatch id={hatchId} scale={headRadiusMm / 60} />
      </defs>
      <circle r={headRadiusMm} fill="#f4f5f3" stroke="#4f564b" strokeWidth={headRadiusMm / 120} />
      {guideRadiiM.map((m) => (
        <g key={m} aria-hidden="true">
          <circle
            r={m * 1000}
            fill="none"
            stroke="#aab0a5"
            strokeWidth={headRadiusMm / 400}
            strokeDasharray={`${headRadiusMm / 80} ${headRadiusMm / 80}`}
          />
          <text x={headRadiusMm / 100} y={-m * 1000 - headRadiusMm / 100} fill="#656d60" fontSize={headRadiusMm / 22}>
            {m} m
          </text>
        </g>
      ))}
      <line aria-hidden="true" x1={-headRadiusMm} x2={headRadiusMm} y1={0} y2={0} stroke="#cdd1ca" strokeWidth={headRadiusMm / 400} />
      <line aria-hidden="true" x1={0} x2={0} y1={-headRadiusMm} y2={headRadiusMm} stroke="#cdd1ca" strokeWidth={headRadiusMm / 400} />
      <text aria-hidden="true" x={0} y={-headRadiusMm - pad * 0.35} textAnchor="middle" fill="#4f564b" fontSize={headRadiusMm / 18}>
        0°
      </text>
      <text
        aria-hidden="true"
        x={headRadiusMm + pad * 0.5}
        y={0}
        textAnchor="middle"
        dominantBaseline="central"
        fill="#4f564b"
        fontSize={headRadiusMm / 18}
      >
        90°
      </text>
      {discs.map(({ p, x, y, size, band, angleDeg }) => {
        const wear = p.lastWearMm == null ? '' : `, wear ${p.lastWearMm} of ${p.wearLimitMm} mm`;
        const name = `Position ${p.number}: ${positionClassLabels[p.positionClass]}, ${band.label.toLowerCase()}${wear}${p.current ? `, serial ${p.current.serial}` : ''}`;
        return (
          <g
            key={p.id}
            role="link"
            tabIndex={0}
            aria-label={name}
            className="group cursor-pointer outline-none"
            onClick={() => open(p.id)}
            onKeyDown={(e) => onKey(e, p.id)}
          >
            <title>{`${name}; radius ${p.trackRadiusMm} mm, ${Math.round(angleDeg)}°${p.angleDeg == null ? ' (laid out evenly)' : ''}`}</title>
            <circle
              cx={x}
              cy={y}
              r={size * 1.5}
              fill="none"
              stroke={focusRing}
              strokeWidth={size * 0.28}
              className="opacity-0 group-hover:opacity-60 group-focus-visible:opacity-100"
            />
            <Disc band={band} x={x} y={y} size={size} label={String(p.number)} hatchId={hatchId} />
          </g>
        );
      })}
    </svg>
  );
}
