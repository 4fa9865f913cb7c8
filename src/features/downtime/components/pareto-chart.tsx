import { Bar, CartesianGrid, Cell, ComposedChart, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { DowntimeReport } from '../../../../shared/schemas/downtime';

type ParetoRow = DowntimeReport['pareto'][number];

const CUTTER_FILL = '#3e443b';
const OTHER_FILL = '#aab0a5';

function ParetoTooltip({ active, payload }: { active?: boolean; payload?: readonly { payload?: ParetoRow }[] }) {
  const d = payload?.[0]?.payload;
  if (!active || !d) return null;
  return (
    <div className="rounded-md border border-basalt-300 bg-white px-3 py-2 text-caption shadow">
      <p className="font-semibold">
        {d.cause}
        {d.cutterWork ? ' (cutter work)' : ''}
      </p>
      <p>
        {d.hours.toFixed(1)} h, {(d.share * 100).toFixed(1)} % of the downtime
      </p>
      <p>Running total {(d.cumulativeShare * 100).toFixed(1)} %</p>
    </div>
  );
}

/** Causes by hours, largest first (bars), with the running share of all downtime (line, right axis). */
export function ParetoChart({ pareto }: { pareto: ParetoRow[] }) {
  if (pareto.length === 0) return <p className="text-basalt-600">No downtime in this period.</p>;
  const data = pareto.map((p) => ({ ...p, cumulativePct: p.cumulativeShare * 100 }));
  const top = pareto.find((p) => p.cumulativeShare >= 0.8) ?? pareto[pareto.length - 1];
  const topCount = pareto.indexOf(top) + 1;
  const summary = `${topCount} of ${pareto.length} causes make ${(top.cumulativeShare * 100).toFixed(0)} % of the downtime; the largest is ${pareto[0].cause} with ${pareto[0].hours.toFixed(1)} h.`;
  return (
    <figure className="space-y-2">
      <div className="h-72 w-full" role="img" aria-label={`Pareto chart of downtime causes. ${summary}`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 8, right: 8, bottom: 8, left: 0 }}>
            <CartesianGrid stroke="#cdd1ca" strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="cause" stroke="#4f564b" fontSize={13} interval={0} angle={-25} textAnchor="end" height={70} />
            <YAxis yAxisId="hours" stroke="#4f564b" fontSize={13} width={52} unit=" h" />
            <YAxis yAxisId="pct" orientation="right" domain={[0, 100]} stroke="#4f564b" fontSize={13} width={52} unit=" %" />
            <Tooltip content={ParetoTooltip} cursor={{ fill: '#e6e8e4' }} />
            <Bar yAxisId="hours" dataKey="hours" name="Hours" isAnimationActive={false}>
              {data.map((d) => (
                <Cell key={d.cause} fill={d.cutterWork ? CUTTER_FILL : OTHER_FILL} />
              ))}
            </Bar>
            <Line
              yAxisId="pct"
              dataKey="cumulativePct"
              name="Running share"
              stroke="#121411"
              strokeWidth={2}
              strokeDasharray="6 3"
              dot={{ r: 4, fill: '#121411' }}
              isAnimationActive={false}
            />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="space-y-1 text-caption text-basalt-700">
        <p>{summary}</p>
        <p className="flex flex-wrap gap-4">
          <span>
            <span aria-hidden="true" className="mr-1 inline-block h-3 w-3 align-middle" style={{ background: CUTTER_FILL }} />
            Cutter work
          </span>
          <span>
            <span aria-hidden="true" className="mr-1 inline-block h-3 w-3 align-middle" style={{ background: OTHER_FILL }} />
            Other causes
          </span>
          <span>
            <span aria-hidden="true" className="mr-1 inline-block w-5 border-t-2 border-dashed border-basalt-950 align-middle" />
            Running share (right axis)
          </span>
        </p>
      </figcaption>
    </figure>
  );
}
