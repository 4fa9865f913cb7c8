import { useId, useLayoutEffect, useState } from 'react';
import { formatChainage } from '../../../../shared/domain/chainage';
import { groundColours, isDarkGround } from '../../../lib/ground-colours';
import type { Geology, GeologySection, GroundType } from '../api';

const WATER = '#4d7ea8';
const MACHINE = '#bd4f09';
const tickSteps = [10, 25, 50, 100, 250, 500, 1000, 2500, 5000, 10000, 25000];

/** Lanes of the strip, px from the top. */
const LABEL_Y = 16;
const GROUND = { top: 24, height: 56 };
const WATER_LANE = { top: 104, height: 56 };
const AXIS_Y = WATER_LANE.top + WATER_LANE.height + 4;
const HEIGHT = AXIS_Y + 24;
const SIDE = 12;

/** The width of an element, followed as it changes; the ref is a callback, so an element mounted later is measured too. */
function useWidth() {
  const [element, setElement] = useState<HTMLDivElement | null>(null);
  const [width, setWidth] = useState(0);
  useLayoutEffect(() => {
    if (!element) return;
    setWidth(element.clientWidth);
    const observer = new ResizeObserver(([entry]) => setWidth(entry.contentRect.width));
    observer.observe(element);
    return () => observer.disconnect();
  }, [element]);
  return [setElement, width] as const;
}

function Swatch({ fill, hatch }: { fill: string; hatch?: string }) {
  return (
    <svg width="28" height="16" aria-hidden="true" className="shrink-0">
      <rect x="0.5" y="0.5" width="27" height="15" fill={fill} stroke="#4f564b" />
      {hatch && <rect x="0.5" y="0.5" width="27" height="15" fill={`url(#${hatch})`} />}
    </svg>
  );
}

function HatchPattern({ id }: { id: string }) {
  // A white and a black stroke side by side: visible on dark and on light bands alike.
  return (
    <pattern id={id} width="10" height="10" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
      <line x1="2" y1="0" x2="2" y2="10" stroke="#ffffff" strokeWidth="2.5" />
      <line x1="4.5" y1="0" x2="4.5" y2="10" stroke="#1d201c" strokeWidth="1.5" />
    </pattern>
  );
}

const metres = (v: number) => `${v.toLocaleString('en-GB', { maximumFractionDigits: 1 })} m`;

function describe(s: GeologySection, groundName: string): string {
  const stop = s.stopAllowed ? 'stops allowed' : `no stop allowed: ${s.stopReason}`;
  return `${formatChainage(s.chainageFromM)} to ${formatChainage(s.chainageToM)}: ${groundName}, water head ${metres(s.waterHeadM)} above the axis, ${stop}.`;
}

/**
 * The long section along chainage: a band per section coloured by ground type (no-stop sections
 * hatched), the water head above the axis as bars, gaps left blank, and the machine's position.
 * Drives whose chainage decreases run right to left, so the machine always advances to the right.
 */
export function LongSectionStrip({
  geology,
  groundTypes,
  driveDirection,
}: {
  geology: Geology;
  groundTypes: GroundType[];
  driveDirection: 'increasing' | 'decreasing';
}) {
  const [ref, width] = useWidth();
  const hatchId = useId().replace(/:/g, '');
  const [active, setActive] = useState<GeologySection | null>(null);
  const sections = [...geology.sections].sort((a, b) => a.chainageFromM - b.chainageFromM);
  const colour = groundColours(groundTypes);
  const name = (id: string) => groundTypes.find((g) => g.id === id)?.name ?? 'Unknown ground type';

  if (sections.length === 0) {
    return <p className="text-basalt-600">No long section yet: the strip appears once sections are saved or imported.</p>;
  }

  const current = geology.currentChainageM;
  const firstM = sections[0].chainageFromM;
  const lastM = Math.max(...sections.map((s) => s.chainageToM));
  // A machine a little outside the long section widens the strip; one far outside would squeeze
  // the sections to slivers, so it is drawn at the edge and said to be beyond.
  const reach = (lastM - firstM) * 0.25;
  const near = current != null && current >= firstM - reach && current <= lastM + reach;
  const lo = near ? Math.min(firstM, current) : firstM;
  const hi = near ? Math.max(lastM, current) : lastM;
  const inner = Math.max(1, width - 2 * SIDE);
  const reversed = driveDirection === 'decreasing';
  const x = (m: number) => SIDE + ((reversed ? hi - m : m - lo) / (hi - lo || 1)) * inner;
  const span = (s: { chainageFromM: number; chainageToM: number }) => {
    const [a, b] = [x(s.chainageFromM), x(s.chainageToM)];
    return { left: Math.min(a, b), w: Math.abs(b - a) };
  };

  const step = tickSteps.find((t) => ((hi - lo) / t) * 90 <= inner) ?? 50000;
  const ticks: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi; t += step) ticks.push(t);
  // Labels at the ends of the axis stay inside the drawing.
  const tickAnchor = (px: number) => (px < SIDE + 28 ? 'start' : px > SIDE + inner - 28 ? 'end' : 'middle');
  const gaps = geology.warnings.map((w) => ({ chainageFromM: w.fromM, chainageToM: w.toM }));
  const maxHeadM = Math.max(1, ...sections.map((s) => s.waterHeadM));
  const shownGrounds = groundTypes.filter((g) => sections.some((s) => s.groundTypeId === g.id));
  const anyNoStop = sections.some((s) => !s.stopAllowed);
  const machineX = current == null ? null : x(Math.min(Math.max(current, lo), hi));
  const machineLabel = current == null ? '' : `Machine ${formatChainage(current)}${near ? '' : ', beyond the long section'}`;

  return (
    <figure className="space-y-3">
      <div ref={ref} className="w-full">
        {width > 0 && (
          <svg width={width} height={HEIGHT} role="group" aria-label="Long section along chainage" className="block font-sans">
            <defs>
              <HatchPattern id={hatchId} />
            </defs>
            <text x={SIDE} y={WATER_LANE.top - 4} fontSize="13" fill="#3e443b">
              Water head above axis (max {metres(maxHeadM)})
            </text>
            <line
              x1={SIDE}
              x2={SIDE + inner}
              y1={WATER_LANE.top + WATER_LANE.height}
              y2={WATER_LANE.top + WATER_LANE.height}
              stroke="#aab0a5"
            />
            {gaps.map((g, i) => {
              const { left, w } = span(g);
              return (
                <g key={`gap-${i}`}>
                  <rect x={left} y={GROUND.top} width={w} height={GROUND.height} fill="#f4f5f3" stroke="#838b7e" strokeDasharray="4 3" />
                  {w > 22 && (
                    <text x={left + w / 2} y={GROUND.top + GROUND.height / 2 + 5} textAnchor="middle" fontSize="14" fill="#3e443b">
                      ?
                    </text>
                  )}
                </g>
              );
            })}
            {sections.map((s) => {
              const { left, w } = span(s);
              const fill = colour.get(s.groundTypeId) ?? '#ffffff';
              const label = name(s.groundTypeId);
              const headH = (s.waterHeadM / maxHeadM) * (WATER_LANE.height - 16);
              const isActive = active?.id === s.id;
              return (
                <g
                  key={s.id}
                  tabIndex={0}
                  role="img"
                  aria-label={describe(s, label)}
                  className="cursor-default outline-none"
                  onMouseEnter={() => setActive(s)}
                  onMouseLeave={() => setActive(null)}
                  onFocus={() => setActive(s)}
                  onBlur={() => setActive(null)}
                >
                  <rect x={left} y={GROUND.top} width={w} height={GROUND.height} fill={fill} stroke="#ffffff" strokeWidth="1" />
                  {!s.stopAllowed && <rect x={left} y={GROUND.top} width={w} height={GROUND.height} fill={`url(#${hatchId})`} />}
                  {w > label.length * 8 + 12 && (
                    <text
                      x={left + w / 2}
                      y={GROUND.top + GROUND.height / 2 + 5}
                      textAnchor="middle"
                      fontSize="14"
                      fontWeight="600"
                      fill={isDarkGround(fill) ? '#ffffff' : '#1d201c'}
                      paintOrder="stroke"
                      stroke={s.stopAllowed ? 'none' : isDarkGround(fill) ? '#1d201c' : '#ffffff'}
                      strokeWidth="4"
                    >
                      {label}
                    </text>
                  )}
                  <rect
                    x={left + 1}
                    y={WATER_LANE.top + WATER_LANE.height - headH}
                    width={Math.max(1, w - 2)}
                    height={headH}
                    fill={WATER}
                  />
                  {w > 36 && (
                    <text
                      x={left + w / 2}
                      y={WATER_LANE.top + WATER_LANE.height - headH - 3}
                      textAnchor="middle"
                      fontSize="12"
                      fill="#2c302a"
                    >
                      {s.waterHeadM.toLocaleString('en-GB', { maximumFractionDigits: 1 })}
                    </text>
                  )}
                  {isActive && (
                    <rect
                      x={left + 1}
                      y={GROUND.top - 1}
                      width={Math.max(1, w - 2)}
                      height={WATER_LANE.top + WATER_LANE.height - GROUND.top + 2}
                      fill="none"
                      stroke="#1d201c"
                      strokeWidth="3"
                    />
                  )}
                </g>
              );
            })}
            {ticks.map((t) => (
              <g key={t} aria-hidden="true">
                <line x1={x(t)} x2={x(t)} y1={AXIS_Y - 4} y2={AXIS_Y + 2} stroke="#4f564b" />
                <text x={x(t)} y={AXIS_Y + 16} textAnchor={tickAnchor(x(t))} fontSize="13" fill="#3e443b">
                  {formatChainage(t).replace(/\.0$/, '')}
                </text>
              </g>
            ))}
            {machineX != null && (
              <g aria-label={machineLabel} role="img">
                <line
                  x1={machineX}
                  x2={machineX}
                  y1={LABEL_Y + 4}
                  y2={AXIS_Y}
                  stroke={MACHINE}
                  strokeWidth="3"
                  strokeDasharray={near ? undefined : '6 4'}
                />
                <text
                  x={Math.min(Math.max(machineX, SIDE + machineLabel.length * 3.6), SIDE + inner - machineLabel.length * 3.6)}
                  y={LABEL_Y}
                  textAnchor="middle"
                  fontSize="14"
                  fontWeight="600"
                  fill="#973d0c"
                >
                  {machineLabel}
                </text>
              </g>
            )}
          </svg>
        )}
      </div>
      <p className="min-h-touch rounded-md bg-basalt-50 px-3 py-2 text-caption" aria-live="polite">
        {active
          ? describe(active, name(active.groundTypeId))
          : 'Point at a section, or move to it with the Tab key, for its ground, water head and whether a stop is allowed.'}
      </p>
      <figcaption>
        <ul className="flex flex-wrap gap-x-5 gap-y-2 text-caption" aria-label="Legend">
          {shownGrounds.map((g) => (
            <li key={g.id} className="flex items-center gap-2">
              <Swatch fill={colour.get(g.id) ?? '#ffffff'} />
              <span>
                <span className="font-semibold">{g.name}</span>
                {g.caiClass ? ` · ${g.caiClass.label} (CAI ${g.cai})` : ' · CAI not given'}
              </span>
            </li>
          ))}
          {anyNoStop && (
            <li className="flex items-center gap-2">
              <Swatch fill="#ffffff" hatch={hatchId} />
              No stop allowed
            </li>
          )}
          {gaps.length > 0 && (
            <li className="flex items-center gap-2">
              <Swatch fill="#f4f5f3" />
              Not in the long section (?)
            </li>
          )}
          <li className="flex items-center gap-2">
            <Swatch fill={WATER} />
            Water head above the axis (m)
          </li>
          {machineX != null && (
            <li className="flex items-center gap-2">
              <svg width="16" height="16" aria-hidden="true">
                <line x1="8" y1="0" x2="8" y2="16" stroke={MACHINE} strokeWidth="3" />
              </svg>
              Machine now
            </li>
          )}
        </ul>
      </figcaption>
    </figure>
  );
}
