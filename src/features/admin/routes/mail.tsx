import { keepPreviousData, useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { formatChainage } from '../../../../shared/domain/chainage';
import { mailKindLabel, mailKinds, ADMIN_MAIL_LIMIT } from '../../../../shared/schemas/admin';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { adminQueries, installationTimeZone, useReleaseUncertainMail, type AdminMail, type AdminMailQuery, type MailAbout } from '../api';
import { AdminTabs } from '../components/admin-tabs';

const stateText: Record<AdminMail['state'], string> = {
  sent: 'Sent',
  waiting: 'Waiting',
  retrying: 'Retrying after a failed attempt',
  uncertain: 'Delivery uncertain',
};

/** What a message was about, in words: the stop by its chainage, the person by name and address. */
const aboutText = (about: MailAbout | null) =>
  about == null ? '' : about.type === 'stop' ? `Stop at ${formatChainage(about.chainageM)}` : `${about.name} (${about.email})`;

const col = createColumnHelper<AdminMail>();

/**
 * Admin → Mail: every message Kerfwise queued, newest first, filtered by kind and recipient, with
 * the stop or person it was about. Times are site time, the zone named: the message's drive's
 * zone, or the installation's (decision 30) for mail that belongs to no drive.
 */
export function AdminMailRoute() {
  const [kind, setKind] = useState('');
  const [recipient, setRecipient] = useState('');
  const filters: AdminMailQuery = { ...(kind ? { kind } : {}), ...(recipient.trim() ? { recipient: recipient.trim() } : {}) };
  const mail = useQuery({ ...adminQueries.mail(filters), placeholderData: keepPreviousData });
  const timeZone = installationTimeZone(useSuspenseQuery(adminQueries.projects()).data);
  const release = useReleaseUncertainMail();
  const data = mail.data;
  const zoneOf = (m: AdminMail) => m.project?.siteTimeZone ?? timeZone;

  const columns = [
    col.accessor((m) => formatSiteDateTime(m.createdAt, zoneOf(m), { withZone: true }), {
      id: 'queued',
      header: 'Queued (site time)',
      sortingFn: (a, b) => a.original.createdAt.localeCompare(b.original.createdAt),
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    col.accessor((m) => mailKindLabel(m.kind), { id: 'kind', header: 'Kind' }),
    col.accessor((m) => m.toAddresses.join(', '), { id: 'to', header: 'To' }),
    col.accessor('subject', {
      header: 'Subject',
      cell: ({ row }) => (
        <button
          type="button"
          className="min-h-touch min-w-56 text-left font-semibold text-ember-700 underline underline-offset-2"
          aria-expanded={row.getIsExpanded()}
          aria-controls={`mail-${row.id}`}
          onClick={() => row.toggleExpanded()}
        >
          {row.original.subject}
          <span className="sr-only"> to {row.original.toAddresses.join(', ')}</span>
        </button>
      ),
    }),
    col.accessor((m) => aboutText(m.about), { id: 'about', header: 'About' }),
    col.accessor((m) => m.project?.name ?? 'Installation', { id: 'drive', header: 'Drive' }),
    col.accessor((m) => stateText[m.state], {
      id: 'state',
      header: 'State',
      cell: ({ row, getValue }) => (
        <span className={row.original.state === 'sent' ? '' : 'font-semibold text-caution-700'}>
          {getValue()}
          {row.original.state === 'sent' && row.original.sentAt && (
            <span className="block whitespace-nowrap text-caption text-basalt-600">
              {formatSiteDateTime(row.original.sentAt, zoneOf(row.original), { withZone: true })}
            </span>
          )}
        </span>
      ),
    }),
  ];

  return (
    <Page title="Administration">
      <AdminTabs />
      {data && (
        <Alert tone={data.outbox.failing > 0 ? 'caution' : 'info'}>
          {data.outbox.waiting === 0
            ? 'Every queued message has been handed to the mail server.'
            : `${data.outbox.waiting} message(s) waiting to be sent${data.outbox.failing ? `, ${data.outbox.failing} after a failed attempt (retried automatically)` : ''}.`}
        </Alert>
      )}
      {data && data.uncertain.length > 0 && (
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
      {mail.error && <Alert tone="error">{mail.error instanceof ApiError ? mail.error.message : 'The mail could not be loaded.'}</Alert>}
      {data && (
        <DataTable
          data={data.messages}
          columns={columns}
          label="Mail, newest first"
          exportName="kerfwise-mail"
          initialSort={[{ id: 'queued', desc: true }]}
          getRowId={(m) => String(m.id)}
          expandIdPrefix="mail-"
          filterable={false}
          emptyText={kind || recipient.trim() ? 'No mail matches these filters.' : 'No mail queued yet.'}
          toolbar={
            <div className="grid gap-3 md:grid-cols-2">
              <SelectField label="Kind" value={kind} onChange={(e) => setKind(e.target.value)}>
                <option value="">Every kind</option>
                {mailKinds.map((k) => (
                  <option key={k.key} value={k.key}>
                    {k.label}
                  </option>
                ))}
              </SelectField>
              <TextField
                label="Recipient (part of the address)"
                type="search"
                value={recipient}
                onChange={(e) => setRecipient(e.target.value)}
                autoComplete="off"
              />
              <p className="text-caption text-basalt-600 md:col-span-2" role="status">
                {data.matching > data.messages.length
                  ? `The newest ${data.messages.length} of ${data.matching.toLocaleString('en-GB')} matching messages.`
                  : `${data.matching} message(s).`}{' '}
                {data.matching > ADMIN_MAIL_LIMIT ? 'Narrow the filters to see older ones.' : ''}
              </p>
            </div>
          }
          renderExpanded={(row) => <pre className="whitespace-pre-wrap font-sans">{row.original.textBody}</pre>}
        />
      )}
    </Page>
  );
}
