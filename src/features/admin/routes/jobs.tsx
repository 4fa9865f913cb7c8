import { useSuspenseQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { Page, Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../../components/ui/data-table';
import { adminQueries, installationTimeZone, useRunJobNow, type JobRunRow } from '../api';
import { AdminTabs } from '../components/admin-tabs';
import { BackupStatusLine } from '../components/backup-status';
import { formatSiteDateTime } from '../../../../shared/site-time';

const outcomeText: Record<string, string> = {
  ok: 'Done',
  failed: 'Failed',
  skipped: 'Skipped (another server ran it)',
  running: 'Running…',
};

const col = createColumnHelper<JobRunRow>();
/** A job's runs; times in the installation's site zone, the zone named (decision 30). */
const runColumns = (timeZone: string) => [
  col.accessor((r) => formatSiteDateTime(r.startedAt, timeZone, { withZone: true }), {
    id: 'started',
    header: 'Started (site time)',
    sortingFn: (a, b) => a.original.startedAt.localeCompare(b.original.startedAt),
    cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
  }),
  col.accessor('trigger', { header: 'How' }),
  col.accessor((r) => outcomeText[r.outcome] ?? r.outcome, {
    id: 'outcome',
    header: 'Outcome',
    cell: ({ row, getValue }) => (
      <span className={`font-semibold ${row.original.outcome === 'failed' ? 'text-alarm-700' : ''}`}>{getValue()}</span>
    ),
  }),
  col.accessor((r) => r.error ?? r.summary ?? '', {
    id: 'summary',
    header: 'Summary or error',
    cell: ({ getValue }) => <span className="block min-w-64">{getValue()}</span>,
  }),
];

/** Scheduled jobs: their last runs, and "run now". */
export function AdminJobsRoute() {
  const { data: jobs } = useSuspenseQuery(adminQueries.jobs());
  const timeZone = installationTimeZone(useSuspenseQuery(adminQueries.projects()).data);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const runJob = useRunJobNow();
  const run = {
    isPending: runJob.isPending,
    mutate: function mutate(vars: { name: string; again?: boolean }) {
      runJob.mutate(vars, {
        onSuccess: (r) =>
          setMessage({
            tone: r.outcome === 'failed' ? 'error' : 'success',
            text: `${r.job}: ${outcomeText[r.outcome] ?? r.outcome}. ${r.summary ?? r.error ?? ''}`,
          }),
        onError: (err) => {
          // A weekly digest whose week was already sent: ask before sending it a second time.
          if (err instanceof ApiError && err.details.confirmAgain === true && !vars.again) {
            setMessage(null);
            if (window.confirm(err.message)) mutate({ name: vars.name, again: true });
            return;
          }
          setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The job could not be started.' });
        },
      });
    },
  };
  return (
    <Page title="Administration">
      <AdminTabs />
      <BackupStatusLine />
      {message && <Alert tone={message.tone}>{message.text}</Alert>}
      {jobs.map((job) => (
        <Panel key={job.name} title={job.label}>
          <div className="mb-3 flex flex-wrap items-center gap-3">
            <code className="rounded bg-basalt-100 px-2 py-1 text-caption">
              {job.name} · {job.cron}
            </code>
            <Button variant="secondary" disabled={run.isPending} onClick={() => run.mutate({ name: job.name })}>
              Run now
            </Button>
          </div>
          {job.runs.length === 0 ? (
            <p className="text-basalt-600">No runs yet.</p>
          ) : (
            <DataTable
              data={job.runs}
              columns={runColumns(timeZone)}
              label={`Last runs of ${job.label}`}
              exportName={`kerfwise-job-${job.name}`}
              getRowId={(r) => String(r.id)}
              initialSort={[{ id: 'started', desc: true }]}
            />
          )}
        </Panel>
      ))}
    </Page>
  );
}
