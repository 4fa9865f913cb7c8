import { useSuspenseQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Alert } from '../../../components/ui/alert';
import { Page } from '../../../components/ui/page';
import { Button } from '../../../components/ui/button';
import { adminQueries, installationTimeZone, useReleaseUncertainMail } from '../api';
import { AdminTabs } from '../components/admin-tabs';
import { formatSiteDateTime } from '../../../../shared/site-time';

/** Mail caught by the local mail catcher (development, demo): what the crews would have received. */
export function AdminMailRoute() {
  const { data } = useSuspenseQuery(adminQueries.mail());
  const timeZone = installationTimeZone(useSuspenseQuery(adminQueries.projects()).data);
  const [openId, setOpenId] = useState<number | null>(null);
  const release = useReleaseUncertainMail();
  return (
    <Page title="Administration">
      <AdminTabs />
      <Alert tone={data.outbox.failing > 0 ? 'caution' : 'info'}>
        {data.outbox.waiting === 0
          ? 'Every queued message has been handed to the mail server.'
          : `${data.outbox.waiting} message(s) waiting to be sent${data.outbox.failing ? `, ${data.outbox.failing} after a failed attempt (retried automatically)` : ''}.`}
      </Alert>
      {data.uncertain.length > 0 && (
        <Alert tone="caution" title="Delivery uncertain">
          <p>
            Sending these was interrupted (the server stopped mid-send). They may or may not have arrived; Kerfwise does not resend them on
            its own, so nobody gets a message twice. Ask a recipient, then send again if needed.
          </p>
          <ul className="mt-2 space-y-2">
            {data.uncertain.map((m) => (
              <li key={m.id} className="flex flex-wrap items-center gap-3">
                <span className="flex-1">
                  <strong>{m.subject}</strong> to {m.toAddresses.join(', ')}
                </span>
                <Button variant="secondary" disabled={release.isPending} onClick={() => release.mutate(m.id)}>
                  Send again
                </Button>
              </li>
            ))}
          </ul>
        </Alert>
      )}
      {data.caught.length === 0 ? (
        <p>No caught mail. When Kerfwise runs with a real mail server (SMTP_URL), messages go there instead.</p>
      ) : (
        <ul className="space-y-2">
          {data.caught.map((m) => (
            <li key={m.id} className="rounded-lg border border-basalt-200 bg-white">
              <button
                type="button"
                className="flex min-h-touch w-full flex-wrap items-center gap-x-4 px-4 py-2 text-left"
                aria-expanded={openId === m.id}
                onClick={() => setOpenId(openId === m.id ? null : m.id)}
              >
                <span className="font-semibold">{m.subject}</span>
                <span className="text-basalt-600">to {m.toAddresses.join(', ')}</span>
                <span className="ml-auto text-caption text-basalt-600">
                  {formatSiteDateTime(m.receivedAt, timeZone, { withZone: true })}
                </span>
              </button>
              {openId === m.id && <pre className="whitespace-pre-wrap border-t border-basalt-100 px-4 py-3 font-sans">{m.textBody}</pre>}
            </li>
          ))}
        </ul>
      )}
    </Page>
  );
}
