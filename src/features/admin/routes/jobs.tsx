import { useSuspenseQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { Page, Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { adminQueries, installationTimeZone, useRunJobNow } from '../api';
import { AdminTabs } from '../components/admin-tabs';
import { BackupStatusLine } from '../components/backup-status';
import { formatSiteDateTime } from '../../../../shared/site-time';

const outcomeText: Record<string, string> = {
  ok: 'Done',
  failed: 'Failed',
  skipped: 'Skipped (another server ran it)',
  running: 'Running…',
};

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
            <table className="w-full text-left text-caption">
              <thead>
                <tr>
                  <th className="py-1 pr-3">Started</th>
                  <th className="pr-3">How</th>
                  <th className="pr-3">Outcome</th>
                  <th>Summary or error</th>
                </tr>
              </thead>
              <tbody>
                {job.runs.map((r) => (
                  <tr key={r.id} className="border-t border-basalt-100">
                    <td className="py-1 pr-3 whitespace-nowrap">{formatSiteDateTime(r.startedAt, timeZone, { withZone: true })}</td>
                    <td className="pr-3">{r.trigger}</td>
                    <td className={`pr-3 font-semibold ${r.outcome === 'failed' ? 'text-alarm-700' : ''}`}>
                      {outcomeText[r.outcome] ?? r.outcome}
                    </td>
                    <td>{r.error ?? r.summary ?? ''}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Panel>
      ))}
    </Page>
  );
}
