import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useParams } from 'react-router';
import type { CutterCostRow } from '../../../../shared/domain/cutter-cost';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { Page, Panel } from '../../../components/ui/page';
import { downtimeQueries } from '../api';
import { DowntimeTabs } from '../components/downtime-tabs';
import { PeriodFilter, usePeriod } from '../components/period-filter';
import { StatTiles } from '../components/stat-tiles';

const col = createColumnHelper<CutterCostRow>();
const money = (v: number | null) => (v == null ? '—' : v.toLocaleString('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 }));
/** Rounded for display and for the CSV the table exports. */
const round = (v: number | null, digits: number) => (v == null ? null : Math.round(v * 10 ** digits) / 10 ** digits);

/** `unit` is ' (EUR)' or '' when the catalogue names no currency. */
const costColumns = (keyHeader: string, unit: string) => [
  col.accessor('key', { header: keyHeader }),
  col.accessor((r) => round(r.advanceM, 1), { id: 'advanceM', meta: { csvDecimals: 1 }, header: 'Advance (m)' }),
  col.accessor((r) => round(r.excavatedM3, 0), { id: 'excavatedM3', meta: { csvDecimals: 0 }, header: 'Excavated (m³)' }),
  col.accessor('changes', { meta: { csvDecimals: 0 }, header: 'Changes' }),
  col.accessor((r) => round(r.partsCost, 2), {
    id: 'partsCost',
    meta: { csvDecimals: 2 },
    header: `Parts${unit}`,
    // Never a bare 0 for a week with changes: name the prices missing and the estimated changes.
    cell: ({ row, getValue }) => (
      <span>
        {money(getValue())}
        {row.original.estimatedChanges > 0 && (
          <span className="block text-caption text-basalt-700">
            {row.original.estimatedChanges} not yet back from the workshop: estimated
          </span>
        )}
        {row.original.missingPrices.length > 0 && (
          <span className="block text-caption font-semibold text-caution-700">No price: {row.original.missingPrices.join(', ')}</span>
        )}
      </span>
    ),
  }),
  col.accessor((r) => round(r.labourCost, 2), {
    id: 'labourCost',
    meta: { csvDecimals: 2 },
    header: `Labour${unit}`,
    cell: ({ getValue }) => money(getValue()),
  }),
  col.accessor((r) => round(r.totalCost, 2), {
    id: 'totalCost',
    meta: { csvDecimals: 2 },
    header: `Total${unit}`,
    cell: ({ getValue }) => money(getValue()),
  }),
  col.accessor((r) => round(r.costPerM, 2), {
    id: 'costPerM',
    meta: { csvDecimals: 2 },
    header: `Cost per m${unit}`,
    cell: ({ getValue }) => money(getValue()),
  }),
  col.accessor((r) => round(r.costPerM3, 2), {
    id: 'costPerM3',
    meta: { csvDecimals: 2 },
    header: `Cost per m³${unit}`,
    cell: ({ getValue }) => money(getValue()),
  }),
  col.accessor((r) => round(r.ringsPer1000M3, 2), {
    id: 'rings',
    meta: { csvDecimals: 2 },
    header: 'Rings per 1,000 m³',
    cell: ({ getValue }) => getValue()?.toFixed(2) ?? '—',
  }),
];

/** Cutter cost (parts and labour) per metre and per m³ excavated, by week and by ground type. */
export function CutterCostRoute() {
  const { projectId = '' } = useParams();
  const period = usePeriod();
  const { data: c } = useSuspenseQuery(downtimeQueries.cost(projectId, period));
  const unit = c.currency ? ` (${c.currency})` : '';
  const amount = (v: number | null) => `${money(v)}${c.currency ? ` ${c.currency}` : ''}`;
  return (
    <Page title="Cutter cost">
      <DowntimeTabs projectId={projectId} />
      <PeriodFilter key={`${c.from}/${c.to}`} shown={c} timeZone={c.timeZone} />
      <StatTiles
        items={[
          {
            label: 'Per metre',
            value: money(c.total.costPerM),
            detail: `${amount(c.total.totalCost)} over ${c.total.advanceM.toFixed(1)} m`,
          },
          {
            label: 'Per m³ excavated',
            value: money(c.total.costPerM3),
            detail: `face area π·D²/4 = ${c.faceAreaM2.toFixed(2)} m² at D = ${c.diameterM} m`,
          },
          {
            label: 'Rings per 1,000 m³',
            value: c.total.ringsPer1000M3 == null ? '—' : c.total.ringsPer1000M3.toFixed(2),
            detail: `${c.total.excavatedM3.toFixed(0)} m³ excavated`,
          },
          {
            label: 'Labour share',
            value: c.total.totalCost > 0 ? `${((c.total.labourCost / c.total.totalCost) * 100).toFixed(0)} %` : '—',
            detail: `cutter-work hours × ${amount(c.labourRatePerHour)} an hour`,
          },
        ]}
      />
      {c.labourRatePerHour === 0 && (
        <Alert tone="caution" title="No labour rate is set.">
          Set it in the site settings on the Events page, or cutter work costs nothing here.
        </Alert>
      )}
      {c.unpricedParts > 0 && (
        <Alert tone="caution" title={`${c.unpricedParts} part(s) used by the workshop have no price in the parts catalogue.`}>
          They are not counted; the cost shown is labour{c.currency ? ' and the priced parts' : ''} only. Each row names the parts it lacks
          a price for; add them in Parts → Catalogue.
        </Alert>
      )}
      <Panel title="By week">
        <DataTable
          data={c.byWeek}
          columns={costColumns('ISO week', unit)}
          exportName={`kerfwise-cutter-cost-weeks-${c.from}-${c.to}`}
          emptyText="No advance or cutter work in this period."
        />
      </Panel>
      <Panel title="By ground type">
        <DataTable
          data={c.byGround}
          columns={costColumns('Ground type', unit)}
          exportName={`kerfwise-cutter-cost-ground-${c.from}-${c.to}`}
          emptyText="No advance or cutter work in this period."
        />
      </Panel>
      <p className="max-w-prose text-caption text-basalt-700">
        {c.partsRule} Advance counts in the week of the stroke’s end and the ground at its middle.
      </p>
    </Page>
  );
}
