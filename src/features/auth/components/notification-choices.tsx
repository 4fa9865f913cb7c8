import { useQuery } from '@tanstack/react-query';
import { Alert } from '../../../components/ui/alert';
import { authQueries, useSetNotificationChoice } from '../api';

/** The e-mails this person gets; each can be turned off (and on again). */
export function NotificationChoices() {
  const { data, error } = useQuery(authQueries.notifications());
  const save = useSetNotificationChoice();
  if (error) return <Alert tone="error">{error.message}</Alert>;
  if (!data) return <p>Loading…</p>;
  if (data.length === 0) return <p>None of Kerfwise’s e-mails apply to your roles.</p>;
  return (
    <fieldset className="space-y-2">
      <legend className="sr-only">E-mail notifications</legend>
      {data.map((c) => (
        <label key={c.kind} className="flex min-h-touch items-center gap-3">
          <input
            type="checkbox"
            className="h-6 w-6"
            checked={c.enabled}
            disabled={save.isPending}
            onChange={(e) => save.mutate({ kind: c.kind, enabled: e.target.checked })}
          />
          {c.label}
        </label>
      ))}
      {save.error && <Alert tone="error">{save.error.message}</Alert>}
    </fieldset>
  );
}
