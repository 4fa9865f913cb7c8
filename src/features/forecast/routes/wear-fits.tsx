import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { conditionLabel, positionClasses, positionClassLabels } from '../../../../shared/cutters';
import type { CautiousSource } from '../../../../shared/domain/cautious-rates';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { forecastQueries, type WearFitGround, type WearFitReport } from '../api';
import { WearChart } from '../components/wear-chart';
import { fixed, whole } from '../format';

const sourceText = (g: WearFitGround) => {
  if (!g.rate) return 'None';
  if (g.rate.source === 'prior') return 'Prior only';
  if (g.rate.source === 'site') return g.rate.priorRateMmPerKm == null ? 'Site' : 'Site only (prior weight 0)';
  if (g.rate.effectiveSiteWeight == null) return 'Blended; this ground shares inspections with others, so no single site weight applies';
  return `Blended, ${fixed(g.rate.effectiveSiteWeight * 100)} % site`;
};

const noteText = (g: WearFitGround) => {
  if (!g.rate) return 'No rate: give this ground a CAI or inspect discs that rolled in it.';
  if (g.rate.heldAtZero) return 'Held at 0: the inspections would give a negative rate.';
  if (g.rate.source === 'prior') return 'No inspection yet: the Gehring estimate from the CAI.';
  return '';
};

/** Where the cautious rate comes from (shared/domain/cautious-rates.ts). */
const cautiousText: Record<CautiousSource, string> = {
  fit: 'fitted rate with the disc scatter and its standard error',
  margin: 'fitted rate plus a margin: too few inspections to measure the scatter',
  'prior-margin': 'prior plus a margin',
  prior: 'rate held at 0: the prior from the CAI stands in',
  'fit-upper-bound': 'rate held at 0: the largest rate the inspections cannot rule out',
  'largest-other': 'rate held at 0: the largest cautious rate of the other grounds',
  none: 'nothing known to be cautious with',
};

const col = createColumnHelper<WearFitGround>();
const rateColumns = [
  col.accessor('name', { header: 'Ground type', cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span> }),
  col.accessor('cai', { meta: { csvDecimals: 1 }, header: 'CAI', cell: ({ getValue }) => fixed(getValue(), 1) }),
  col.accessor(
    (g) => (g.caiClass ? `${g.caiClass.label}${g.caiClass.outsideTabulatedRange ? ' (outside the table)' : ''}` : 'Not tested'),
    {
      id: 'class',
      header: 'CERCHAR class',
    },
  ),
  col.accessor('priorMmPerKm', { meta: { csvDecimals: 4 }, header: 'Prior rate (mm/km)', cell: ({ getValue }) => fixed(getValue(), 4) }),
  col.accessor(
    (g) =>
      g.rate
        ? `${fixed(g.rate.rateMmPerKm, 4)}${g.rate.standardErrorMmPerKm == null ? '' : ` ± ${fixed(g.rate.standardErrorMmPerKm, 4)}`}`
        : '—',
    {
      id: 'rate',
      header: 'Fitted rate ± standard error (mm/km)',
      sortingFn: (a, b) => (a.original.rate?.rateMmPerKm ?? -1) - (b.original.rate?.rateMmPerKm ?? -1),
      cell: ({ getValue }) => <span className="whitespace-nowrap font-semibold">{getValue()}</span>,
    },
  ),
  col.accessor((g) => g.rate?.siteOnlyRateMmPerKm, {
    id: 'siteOnly',
    meta: { csvDecimals: 4 },
    header: 'Site-only rate (mm/km)',
    cell: ({ getValue }) => fixed(getValue(), 4),
  }),
  col.accessor((g) => g.cautious?.p90MmPerKm, {
    id: 'p90',
    meta: { csvDecimals: 4 },
    header: 'Cautious P90 rate (mm/km)',
    cell: ({ getValue, row }) => (
      <span className="block min-w-40">
        <span className="font-semibold">{fixed(getValue(), 4)}</span>
        {row.original.cautious && (
          <span className="block text-caption text-basalt-600">{cautiousText[row.original.cautious.cautiousSource]}</span>
        )}
      </span>
    ),
  }),
  // Two counts, two names (issue 16): the fit uses every inspection whose disc rolled here, the chart only those that rolled nowhere else.
  col.accessor((g) => g.rate?.observationCount ?? 0, {
    id: 'n',
    meta: { csvDecimals: 0 },
    header: 'Inspections in the fit (rolled here, alone or with other ground)',
  }),
  col.accessor(sourceText, { id: 'source', header: 'Source' }),
  col.accessor(noteText, { id: 'note', header: 'Note', cell: ({ getValue }) => <span className="block min-w-56">{getValue()}</span> }),
];

type Failure = WearFitReport['failures'][number];
const fCol = createColumnHelper<Failure>();
const failureColumns = [
  fCol.accessor('groundName', { header: 'Ground type' }),
  fCol.accessor('eventCount', { meta: { csvDecimals: 0 }, header: 'Sudden failures' }),
  fCol.accessor('rolledKm', { meta: { csvDecimals: 0 }, header: 'Km rolled by all discs', cell: ({ getValue }) => whole(getValue()) }),
  fCol.accessor('ratePer1000Km', { meta: { csvDecimals: 2 }, header: 'Per 1,000 km', cell: ({ getValue }) => fixed(getValue(), 2) }),
];

type AbnormalEvent = WearFitReport['abnormalEvents'][number];

/** Wear rates per ground type: the table, the measurements behind each, and the sudden failures left out of the fit. */
export function WearFitsRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: report } = useSuspenseQuery(forecastQueries.wearFit(projectId));
  const tz = project.siteTimeZone;
  const charted = report.grounds
    .map((g) => ({ ground: g, count: report.points.filter((p) => p.groundTypeId === g.id).length }))
    .filter((x) => x.count > 0);
  const [chosen, setChosen] = useState<string | null>(null);
  const groundId = chosen ?? [...charted].sort((a, b) => b.count - a.count)[0]?.ground.id ?? null;

  const eCol = createColumnHelper<AbnormalEvent>();
  const eventColumns = [
    eCol.accessor((e) => formatSiteDate(e.at, tz), {
      id: 'date',
      header: 'Date',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    eCol.accessor('positionNumber', { meta: { csvDecimals: 0 }, header: 'Position' }),
    eCol.accessor((e) => e.conditions.map(conditionLabel).join(', '), { id: 'conditions', header: 'Found' }),
    eCol.accessor('chainageM', {
      meta: { csvDecimals: 1 },
      header: 'Chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
  ];

  return (
    <Page
      title="Wear rates by ground"
      actions={
        <Link
          className="flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2"
          to="../forecast"
          relative="path"
        >
          Change-out forecast
        </Link>
      }
    >
      <Panel title="Rates">
        <p className="mb-3 max-w-prose">
          Radial ring wear per km a face disc rolls in each ground type, fitted to every normal-wear inspection. Where a ground has a CAI,
          the Gehring estimate from it is the starting point (the prior) until the site’s own inspections outweigh it. The site-only rate is
          the same fit without the prior; the site share is read off the two (fitted = share × site-only + rest × prior). The cautious P90
          rate is what the forecast plans with: never below the fitted rate, and never 0 for a ground whose rate is held at 0.
        </p>
        <DataTable
          data={report.grounds}
          columns={rateColumns}
          exportName="kerfwise-wear-rates"
          emptyText="No ground types yet: add them to the drive data."
        />
        <dl className="mt-3 grid gap-x-6 gap-y-1 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Residual standard deviation</dt>
          <dd>
            {report.residualSdMm == null ? 'not known yet (too few inspections)' : `${fixed(report.residualSdMm, 2)} mm`} from{' '}
            {whole(report.observationCount)} inspections
            {report.residualDof > 0 && ` (${whole(report.residualDof)} degrees of freedom)`}
          </dd>
          <dt className="font-semibold">Class factors</dt>
          <dd>
            {positionClasses.map((c) => `${positionClassLabels[c]} ${report.classFactors[c]}`).join(' · ')} (face discs are the reference)
          </dd>
          <dt className="font-semibold">Ring diameter for the prior</dt>
          <dd>{fixed(report.ringDiameterMm, 0)} mm</dd>
        </dl>
      </Panel>

      <Panel title="Measured wear against km rolled">
        {groundId == null ? (
          <Alert tone="info" title="Nothing to chart yet.">
            The chart fills in as inspections of discs that rolled in one ground are recorded.
          </Alert>
        ) : (
          <div className="space-y-3">
            <div className="max-w-sm">
              <SelectField label="Ground type" value={groundId} onChange={(e) => setChosen(e.target.value)}>
                {charted.map(({ ground, count }) => (
                  <option key={ground.id} value={ground.id}>
                    {ground.name} ({whole(count)} inspections in this ground alone)
                  </option>
                ))}
              </SelectField>
            </div>
            <p className="max-w-prose text-caption text-basalt-700">
              The chart shows only inspections of discs that rolled in this one ground since they were fitted, so it can count fewer than
              the table: the fit also uses discs that rolled here and in other ground, their wear read as each ground’s rate times the km
              rolled in it.
            </p>
            <WearChart report={report} groundTypeId={groundId} />
          </div>
        )}
      </Panel>

      <Panel title="Sudden failures per 1,000 km">
        <p className="mb-3 max-w-prose">
          Flat spots, chipped or cracked rings, lost rings and deformed edges stay out of the wear fit. Each is counted against the ground
          its disc rolled in most since it was fitted.
        </p>
        <DataTable
          data={[...report.failures].sort((a, b) => a.groundName.localeCompare(b.groundName))}
          columns={failureColumns}
          exportName="kerfwise-sudden-failures"
          emptyText="No disc has rolled in a known ground yet."
        />
      </Panel>

      <Panel title="Abnormal wear found">
        <DataTable
          data={[...report.abnormalEvents].sort((a, b) => b.at.localeCompare(a.at))}
          columns={eventColumns}
          exportName="kerfwise-abnormal-wear"
          emptyText="No abnormal wear recorded."
        />
      </Panel>
    </Page>
  );
}
