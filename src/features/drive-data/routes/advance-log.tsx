import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery, useQueryClient, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper, type PaginationState, type SortingState } from '@tanstack/react-table';
import { useCallback, useEffect, useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { useParams } from 'react-router';
import type { z } from 'zod';
import { roleCan } from '../../../../shared/roles';
import { strokeListQuerySchema, type StrokeListQuery } from '../../../../shared/schemas/geology';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { driveDataQueries, strokesExportUrl, type Stroke, type StrokeFilters } from '../api';
import { AdvanceLogImport } from '../components/advance-log-import';
import { DailyAdvanceChart } from '../components/daily-advance-chart';

/** The server takes 10 to 500 rows a page (shared/schemas/geology.ts). */
const pageSizes = [10, 25, 50, 100, 250, 500];

const num = (v: number | null, decimals: number) =>
  v == null ? '—' : v.toLocaleString('en-GB', { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
const col = createColumnHelper<Stroke>();

function strokeColumns(timeZone: string) {
  // Column ids are the server's sort keys; the columns without one do not sort.
  return [
    col.accessor('ringNumber', { meta: { csvDecimals: 0 }, header: 'Ring' }),
    col.accessor('startTime', {
      header: 'Start – end (site time)',
      cell: ({ row }) => (
        <span className="whitespace-nowrap">
          {formatSiteDateTime(row.original.startTime, timeZone)}–{formatSiteDateTime(row.original.endTime, timeZone).slice(11)}
        </span>
      ),
    }),
    col.accessor('chainageStartM', {
      meta: { csvDecimals: 1 },
      header: 'Chainage start → end',
      cell: ({ row }) => (
        <span className="whitespace-nowrap">
          {formatChainage(row.original.chainageStartM)} → {formatChainage(row.original.chainageEndM)}
        </span>
      ),
    }),
    col.accessor('revolutions', { meta: { csvDecimals: 0 }, header: 'Revolutions', cell: ({ getValue }) => num(getValue(), 0) }),
    col.accessor('penetrationMmPerRev', {
      meta: { csvDecimals: 1 },
      header: 'Penetration (mm/rev)',
      cell: ({ getValue }) => num(getValue(), 1),
    }),
    col.accessor('rpm', { meta: { csvDecimals: 1 }, header: 'Speed (rpm)', cell: ({ getValue }) => num(getValue(), 1) }),
    col.accessor('thrustKn', { meta: { csvDecimals: 0 }, header: 'Thrust (kN)', cell: ({ getValue }) => num(getValue(), 0) }),
    col.accessor('torqueKnm', { meta: { csvDecimals: 0 }, header: 'Torque (kN·m)', cell: ({ getValue }) => num(getValue(), 0) }),
  ];
}

/** The filters of the server's list query; a blank field is "no filter". */
const filterSchema = strokeListQuerySchema.pick({ ringFrom: true, ringTo: true, from: true, to: true });
type FilterForm = z.input<typeof filterSchema>;
const blankIsNothing = { setValueAs: (v: unknown) => (v === '' || v == null ? undefined : v) };

/**
 * The filters apply as they are typed: each change is checked with the server's schema, and only a
 * valid set reaches the list (a value it cannot use is named beside its field).
 */
function StrokeFilterForm({ onFilters }: { onFilters: (filters: StrokeFilters) => void }) {
  const form = useForm<FilterForm, unknown, StrokeFilters>({
    resolver: zodResolver(filterSchema),
    mode: 'onChange',
    defaultValues: { ringFrom: undefined, ringTo: undefined, from: undefined, to: undefined },
  });
  const e = form.formState.errors;
  const values = form.watch();
  const filtered = Object.values(values).some((v) => v !== undefined && v !== '');
  useEffect(() => {
    const apply = form.handleSubmit(onFilters);
    const watching = form.watch(() => void apply());
    return () => watching.unsubscribe();
  }, [form, onFilters]);
  return (
    <form
      className="grid grid-cols-2 gap-3 md:grid-cols-[1fr_1fr_1fr_1fr_auto] md:items-end"
      onSubmit={form.handleSubmit(onFilters)}
      noValidate
      aria-label="Filter the log"
    >
      <TextField
        label="Ring from"
        type="number"
        inputMode="numeric"
        step={1}
        {...form.register('ringFrom', blankIsNothing)}
        error={e.ringFrom?.message}
      />
      <TextField
        label="Ring to"
        type="number"
        inputMode="numeric"
        step={1}
        {...form.register('ringTo', blankIsNothing)}
        error={e.ringTo?.message}
      />
      <TextField label="Date from" type="date" {...form.register('from', blankIsNothing)} error={e.from?.message} />
      <TextField label="Date to" type="date" {...form.register('to', blankIsNothing)} error={e.to?.message} />
      <Button
        variant="ghost"
        disabled={!filtered}
        onClick={() => {
          form.reset();
          onFilters({});
        }}
      >
        Clear filters
      </Button>
    </form>
  );
}

/** The advance log: server-side paging, sorting and filtering, so a drive of 50,000 strokes stays quick. */
export function AdvanceLogRoute() {
  const { projectId = '' } = useParams();
  const queryClient = useQueryClient();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const daily = useQuery(driveDataQueries.daily(projectId));
  const [sorting, setSorting] = useState<SortingState>([{ id: 'ringNumber', desc: true }]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 50 });
  const [filters, setFilters] = useState<StrokeFilters>({});
  const onFilters = useCallback((next: StrokeFilters) => {
    setFilters(next);
    setPagination((p) => ({ ...p, pageIndex: 0 }));
  }, []);

  const query: StrokeListQuery = {
    page: pagination.pageIndex + 1,
    pageSize: pagination.pageSize,
    sort: (sorting[0]?.id ?? 'ringNumber') as StrokeListQuery['sort'],
    dir: sorting[0]?.desc === false ? 'asc' : 'desc',
    ...filters,
  };
  const list = useQuery(driveDataQueries.strokes(projectId, query));
  const columns = useMemo(() => strokeColumns(project.siteTimeZone), [project.siteTimeZone]);
  const total = list.data?.total ?? 0;

  const filtered = Object.values(filters).some((v) => v !== undefined);
  const first = total === 0 ? 0 : pagination.pageIndex * pagination.pageSize + 1;
  const last = Math.min(total, (pagination.pageIndex + 1) * pagination.pageSize);

  return (
    <Page title="Advance log">
      <p className="max-w-prose text-basalt-700">
        One row per ring or stroke as the machine logged it. Times are site time ({project.siteTimeZone}). The export holds every stroke
        that matches the filters.
      </p>

      <Panel title="Advance per day">
        {daily.error ? (
          <Alert tone="error">{daily.error.message}</Alert>
        ) : daily.data ? (
          <DailyAdvanceChart days={daily.data} />
        ) : (
          <p>Loading…</p>
        )}
      </Panel>

      <Panel title="Strokes">
        <div className="space-y-4">
          <DataTable
            data={list.data?.rows ?? []}
            columns={columns}
            label="Advance log"
            exportName="kerfwise-advance-log"
            exportHref={strokesExportUrl(projectId, filters)}
            getRowId={(row) => String(row.id)}
            emptyText={
              list.isPending
                ? 'Loading…'
                : filtered
                  ? 'No strokes match the filters.'
                  : roleCan(project.role, 'drive.edit')
                    ? 'No strokes yet. Import the machine’s advance log below.'
                    : 'No strokes yet: the planner imports the advance log.'
            }
            server={{
              rowCount: total,
              sorting,
              onSortingChange: (updater) => {
                setSorting(updater);
                setPagination((p) => ({ ...p, pageIndex: 0 }));
              },
              pagination,
              onPaginationChange: setPagination,
              pageSizes,
              stale: list.isPlaceholderData,
            }}
            toolbar={
              <>
                <StrokeFilterForm onFilters={onFilters} />
                <p role="status" className="font-semibold">
                  {list.isPending
                    ? 'Loading…'
                    : `${total.toLocaleString('en-GB')} ${total === 1 ? 'stroke' : 'strokes'}${filtered ? ' match the filters' : ''}${total > 0 ? ` · rows ${first.toLocaleString('en-GB')}–${last.toLocaleString('en-GB')}` : ''}`}
                  {list.isPlaceholderData && <span className="ml-2 font-normal text-basalt-600">updating…</span>}
                </p>
                {list.error && <Alert tone="error">{list.error.message}</Alert>}
              </>
            }
          />
        </div>
      </Panel>

      {roleCan(project.role, 'drive.edit') && (
        <AdvanceLogImport
          projectId={projectId}
          onImported={() => queryClient.invalidateQueries({ queryKey: driveDataQueries.all(projectId) })}
        />
      )}
    </Page>
  );
}
