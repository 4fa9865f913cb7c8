import { Bar, BarChart, CartesianGrid, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { DailyAdvance } from '../api';

const dayLabel = (day: string) =>
  new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' });

function DayTooltip({ active, payload }: { active?: boolean; payload?: readonly { payload?: DailyAdvance }[] }) {
  const d = payload?.[0]?.payload;
  if (!active || !d) return null;
  return (
    <div className="rounded-md border border-basalt-300 bg-white px-3 py-2 text-caption shadow">
      <p className="font-semibold">{d.day}</p>
      <p>
        {d.advanceM.toFixed(1)} m in {d.strokes} stroke{d.strokes === 1 ? '' : 's'}
      </p>
    </div>
  );
}

/** Metres advanced per calendar day of the site, as bars. */
export function DailyAdvanceChart({ days }: { days: DailyAdvance[] }) {
  if (days.length === 0) return <p className="text-basalt-600">No strokes yet: the chart fills in after the first import.</p>;
  const totalM = days.reduce((s, d) => s + d.advanceM, 0);
  const best = days.reduce((a, b) => (b.advanceM > a.advanceM ? b : a));
  const summary = `${totalM.toFixed(1)} m over ${days.length} day${days.length === 1 ? '' : 's'} with strokes; ${(totalM / days.length).toFixed(1)} m a day on average, best day ${best.day} with ${best.advanceM.toFixed(1)} m.`;
  return (
    <figure className="space-y-2">
      <div className="h-48 w-full" role="img" aria-label={`Advance per day. ${summary}`}>
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={days} margin={{ top: 8, right: 8, bottom: 0, left: 0 }}>
            <CartesianGrid stroke="#cdd1ca" strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="day" tickFormatter={dayLabel} stroke="#4f564b" fontSize={13} minTickGap={16} />
            <YAxis stroke="#4f564b" fontSize={13} width={52} unit=" m" />
            <Tooltip content={DayTooltip} cursor={{ fill: '#e6e8e4' }} />
            <Bar dataKey="advanceM" name="Advance (m)" fill="#4f564b" isAnimationActive={false} />
          </BarChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="text-caption text-basalt-700">{summary}</figcaption>
    </figure>
  );
}
