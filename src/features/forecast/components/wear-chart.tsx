import { Area, CartesianGrid, ComposedChart, Line, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import { positionClasses, positionClassLabels, type PositionClass } from '../../../../shared/cutters';
import type { WearFitReport } from '../api';
import { fixed, formatRate } from '../format';

/** Each class has its own colour and marker shape, so the chart reads without colour too. */
const classStyle: Record<PositionClass, { colour: string; shape: 'circle' | 'square' | 'triangle'; mark: string }> = {
  centre: { colour: '#2b6a99', shape: 'circle', mark: 'M8 2a6 6 0 1 0 0.01 0z' },
  face: { colour: '#2c302a', shape: 'square', mark: 'M2.5 2.5h11v11h-11z' },
  gauge: { colour: '#bd4f09', shape: 'triangle', mark: 'M8 1.5l7 13h-14z' },
};
const LINE_STEPS = 12;

/**
 * Measured wear against km rolled for the inspections in one ground type, with the fitted line
 * (rate × class factor × km) per position class and a band of ± the residual standard deviation.
 */
export function WearChart({ report, groundTypeId }: { report: WearFitReport; groundTypeId: string }) {
  const ground = report.grounds.find((g) => g.id === groundTypeId);
  const rate = ground?.rate?.rateMmPerKm ?? null;
  const sd = report.residualSdMm;
  const points = report.points
    .filter((p) => p.groundTypeId === groundTypeId)
    .map((p) => ({ km: p.rolledKm, wearMm: p.wearMm, positionClass: p.positionClass }));
  const classes = positionClasses.filter((c) => points.some((p) => p.positionClass === c));
  const maxKm = Math.max(1, ...points.map((p) => p.km));
  // Each class's line runs as far as its own inspections go.
  const fitted = (c: PositionClass) =>
    Array.from({ length: LINE_STEPS + 1 }, (_, i) => {
      const km = (Math.max(...points.filter((p) => p.positionClass === c).map((p) => p.km)) * i) / LINE_STEPS;
      const fitMm = (rate ?? 0) * report.classFactors[c] * km;
      return { km, fitMm, band: sd == null ? null : [Math.max(0, fitMm - sd), fitMm + sd] };
    });
  if (points.length === 0)
    return <p className="text-basalt-600">No inspection in this ground alone yet: every disc measured here also rolled in other ground.</p>;
  return (
    <figure className="space-y-2">
      <div
        className="h-96 w-full"
        role="img"
        aria-label={`Measured wear against km rolled in ${ground?.name ?? 'this ground'}: ${points.length} inspections in this ground alone, fitted rate ${formatRate(rate)} mm/km for a face disc`}
      >
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 16, right: 24, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#cdd1ca" strokeDasharray="3 3" />
            <XAxis
              type="number"
              dataKey="km"
              domain={[0, Math.ceil(maxKm)]}
              stroke="#4f564b"
              fontSize={14}
              tickFormatter={(v: number) => fixed(v, 0)}
              label={{ value: 'Km rolled since fitted', position: 'insideBottom', offset: -12, fill: '#2c302a', fontSize: 14 }}
            />
            <YAxis type="number" unit=" mm" stroke="#4f564b" fontSize={14} width={64} />
            <Tooltip
              formatter={(v) => (Array.isArray(v) ? `${fixed(Number(v[0]), 2)}–${fixed(Number(v[1]), 2)} mm` : `${fixed(Number(v), 2)} mm`)}
              labelFormatter={(v) => `${fixed(Number(v), 1)} km`}
            />
            {sd != null &&
              classes.map((c) => (
                <Area
                  key={`band-${c}`}
                  data={fitted(c)}
                  dataKey="band"
                  name={`${positionClassLabels[c]}: fitted ± residual SD`}
                  stroke="none"
                  fill={classStyle[c].colour}
                  fillOpacity={0.18}
                  isAnimationActive={false}
                />
              ))}
            {classes.map((c) => (
              <Scatter
                key={`points-${c}`}
                data={points.filter((p) => p.positionClass === c)}
                dataKey="wearMm"
                name={`${positionClassLabels[c]} discs, measured`}
                fill={classStyle[c].colour}
                fillOpacity={0.55}
                shape={classStyle[c].shape}
                isAnimationActive={false}
              />
            ))}
            {rate != null &&
              classes.map((c) => (
                <Line
                  key={`fit-${c}`}
                  data={fitted(c)}
                  dataKey="fitMm"
                  name={`${positionClassLabels[c]}: fitted`}
                  stroke={classStyle[c].colour}
                  strokeWidth={2.5}
                  dot={false}
                  isAnimationActive={false}
                />
              ))}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <ul className="flex flex-wrap gap-x-5 gap-y-1 text-caption" aria-label="Legend">
        {classes.map((c) => (
          <li key={c} className="flex items-center gap-2">
            <svg width="40" height="16" aria-hidden="true">
              <rect x="0" y="2" width="40" height="12" fill={classStyle[c].colour} fillOpacity={sd == null ? 0 : 0.18} />
              <line x1="0" y1="8" x2="40" y2="8" stroke={classStyle[c].colour} strokeWidth="2.5" />
              <path d={classStyle[c].mark} fill={classStyle[c].colour} transform="translate(12 0)" />
            </svg>
            {positionClassLabels[c]} discs: measured; fitted {formatRate(rate)} × {report.classFactors[c]} mm/km
            {sd != null && ` ± ${fixed(sd, 2)} mm`}
          </li>
        ))}
      </ul>
      <figcaption className="text-caption text-basalt-600">
        Each mark is one inspection of a disc that rolled in this ground only since it was fitted. Lines: the fitted rate times the class
        factor times the km rolled. Shaded band: the fitted line ± the residual standard deviation of all inspections about the fit
        {sd == null ? ' (not known yet)' : ` (${fixed(sd, 2)} mm)`}, where about two out of three inspections should fall.
      </figcaption>
    </figure>
  );
}
