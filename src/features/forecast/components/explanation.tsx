import { useQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../../components/ui/data-table';
import type { EstimateBasis, Fallback } from '../../../../shared/domain/forecast';
import { positionClassLabels } from '../../../../shared/cutters';
import { Alert } from '../../../components/ui/alert';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate } from '../../../../shared/site-time';
import { forecastQueries, type PositionForecast } from '../api';
import { fixed, formatRate, pgTimestampToIso } from '../format';

const fallbackText: Record<Fallback, string> = {
  wear_rate: 'wear rate of the most abrasive known ground',
  penetration: 'lowest known penetration',
  advance: 'fastest known advance',
};

const basisText = (basis: EstimateBasis | null | undefined) =>
  !basis
    ? 'no estimate'
    : basis.source === 'planner'
      ? 'set by the planner'
      : `last ${basis.strokeCount} strokes (${fixed(basis.advanceM, 0)} m)`;

type Section = NonNullable<PositionForecast['explanation']>['sections'][number];
const sCol = createColumnHelper<Section>();
const nowrap = (text: string) => <span className="whitespace-nowrap">{text}</span>;
/** The sections walked ahead; numbers with the decimals they show (and export). */
const sectionColumns = (groundName: (id: string | null) => string) => [
  sCol.accessor('fromChainageM', { header: 'From', meta: { csvDecimals: 1 }, cell: ({ getValue }) => nowrap(formatChainage(getValue())) }),
  sCol.accessor('toChainageM', { header: 'To', meta: { csvDecimals: 1 }, cell: ({ getValue }) => nowrap(formatChainage(getValue())) }),
  sCol.accessor('lengthM', { header: 'Length (m)', meta: { csvDecimals: 1 } }),
  sCol.accessor((s) => groundName(s.groundTypeId), { id: 'ground', header: 'Ground' }),
  sCol.accessor('penetrationMmPerRev', { header: 'Penetration (mm/rev)', meta: { csvDecimals: 2 } }),
  sCol.accessor('rolledKmPerM', { header: 'Rolled (km per m)', meta: { csvDecimals: 3 } }),
  sCol.accessor((s) => `${formatRate(s.rateMmPerKm.p50)} / ${formatRate(s.rateMmPerKm.p90)}`, {
    id: 'rate',
    header: 'Rate P50 / P90 (mm/km)',
    cell: ({ getValue }) => nowrap(getValue()),
  }),
  sCol.accessor((s) => `${fixed(s.wearMmPerM.p50, 4)} / ${fixed(s.wearMmPerM.p90, 4)}`, {
    id: 'wearPerM',
    header: 'Wear per m P50 / P90 (mm)',
    cell: ({ getValue }) => nowrap(getValue()),
  }),
  sCol.accessor('advanceMPerDay', { header: 'Advance (m/day)', meta: { csvDecimals: 1 } }),
  sCol.accessor('days', { header: 'Days', meta: { csvDecimals: 1 } }),
  sCol.accessor((s) => (s.fallbacks.length ? s.fallbacks.map((f) => fallbackText[f]).join('; ') : '—'), {
    id: 'fallbacks',
    header: 'Unknown ground: stand-ins',
  }),
];

interface GroundRate {
  ground: string;
  rate: string;
  penetration: string;
  advance: string;
}
const gCol = createColumnHelper<GroundRate>();
const rateColumns = [
  gCol.accessor('ground', { header: 'Ground' }),
  gCol.accessor('rate', { header: 'Wear rate P50 / P90 (mm/km)' }),
  gCol.accessor('penetration', { header: 'Penetration (mm/rev)' }),
  gCol.accessor('advance', { header: 'Advance (m/day)' }),
];

/** How one position's forecast was made: wear now, each section walked ahead, and the rates used. Fetched when opened. */
export function Explanation({
  projectId,
  positionId,
  groundName,
  timeZone,
}: {
  projectId: string;
  positionId: string;
  groundName: (id: string | null) => string;
  timeZone: string;
}) {
  const { data, error, isPending } = useQuery(forecastQueries.explanation(projectId, positionId));
  if (isPending) return <p role="status">Working out how this forecast was made…</p>;
  if (error)
    return (
      <Alert tone="error" title="The explanation could not be loaded.">
        {error.message}
      </Alert>
    );
  const p: PositionForecast | null = data.position;
  const e = p?.explanation;
  if (!p || !e)
    return (
      <Alert tone="caution" title="This position is no longer in the forecast.">
        Its cutter may have been removed since the page was loaded.
      </Alert>
    );
  const { rates, driveRates } = data.forecast;
  const grounds = [...new Set(e.sections.map((s) => s.groundTypeId).filter((g): g is string => g != null))];
  const limit = p.position.allowableWearMm;
  const lastAt = p.lastMeasuredAt ? formatSiteDate(pgTimestampToIso(p.lastMeasuredAt), timeZone) : null;
  const outcome = (q: 'p50' | 'p90') => {
    const point = p[q];
    if (point.status === 'over_limit') return `already at or over the ${limit} mm limit (${fixed(point.wearNowMm)} mm)`;
    if (point.status === 'beyond_known_ground')
      return `only ${fixed(point.wearThereMm)} mm by the end of known ground at ${formatChainage(point.chainageM)}; the limit lies beyond`;
    return `reaches ${limit} mm at ${formatChainage(point.chainageM)}, ${fixed(point.remainingM, 0)} m ahead`;
  };

  return (
    <div className="space-y-4">
      <section aria-label="Wear now">
        <h4 className="font-semibold">Wear now</h4>
        <p className="max-w-prose">
          {lastAt ? (
            <>
              Last measured {fixed(e.wearNow.lastMeasuredWearMm)} mm at {formatChainage(e.wearNow.measuredAtChainageM)} on {lastAt}.
            </>
          ) : (
            <>Not measured since fitted at {formatChainage(e.wearNow.measuredAtChainageM)}: counted from 0 mm.</>
          )}{' '}
          Since then the disc has rolled on to {formatChainage(e.currentChainageM)}, modelled as +{fixed(e.wearNow.modelledSinceMm.p50, 2)}{' '}
          mm (P50) and +{fixed(e.wearNow.modelledSinceMm.p90, 2)} mm (P90): wear now {fixed(e.wearNowMm.p50)} mm (P50),{' '}
          {fixed(e.wearNowMm.p90)} mm (P90). {positionClassLabels[p.position.positionClass]} discs wear {e.classFactor} × a face disc’s
          rate; track radius {p.position.trackRadiusMm} mm.
        </p>
      </section>

      <section aria-label="Sections walked">
        <h4 className="font-semibold">Sections walked ahead</h4>
        {e.sections.length === 0 ? (
          <p>None: the position is over its limit now.</p>
        ) : (
          <DataTable
            data={e.sections}
            columns={sectionColumns(groundName)}
            label="Sections walked ahead"
            exportName={`kerfwise-forecast-position-${p.position.positionNumber}-sections`}
            getRowId={(s) => `${s.fromChainageM}-${s.toChainageM}`}
            filterable={false}
          />
        )}
        <p className="mt-2 max-w-prose">
          Central (P50): {outcome('p50')}. Cautious (P90): {outcome('p90')}.
          {e.usesFallback && ' Part of the way lies in unknown ground, where the most cautious known values stand in.'}
        </p>
      </section>

      {grounds.length > 0 && (
        <section aria-label="Rates used">
          <h4 className="font-semibold">Rates used</h4>
          <DataTable
            data={grounds.map((g) => ({
              ground: groundName(g),
              rate: `${formatRate(rates.byGround[g]?.p50MmPerKm)} / ${formatRate(rates.byGround[g]?.p90MmPerKm)}`,
              penetration: `${fixed(driveRates.penetrationMmPerRevByGround[g], 2)} — ${basisText(driveRates.basis[g]?.penetration)}`,
              advance: `${fixed(driveRates.advanceMPerDayByGround[g])} — ${basisText(driveRates.basis[g]?.advance)}`,
            }))}
            columns={rateColumns}
            label="Rates used"
            exportName={`kerfwise-forecast-position-${p.position.positionNumber}-rates`}
            filterable={false}
          />
          <p className="mt-2 max-w-prose text-caption text-basalt-600">
            The P90 rate adds the fit’s own uncertainty and the scatter of single discs about it
            {rates.relativeScatter != null && ` (${fixed(rates.relativeScatter * 100)} % here)`}; a ground known only from its CAI gets a
            fixed margin over its prior.
          </p>
        </section>
      )}
    </div>
  );
}
