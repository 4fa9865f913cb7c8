import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { Alert } from '../../../components/ui/alert';
import { api, apiGet } from '../../../lib/api-client';

interface Choice { kind: string; label: string; enabled: boolean }
const key = ['auth', 'notifications'] as const;

/** The e-mails this person gets; each can be turned off (and on again). */
export function NotificationChoices() {
  const queryClient = useQueryClient();
  const { data, error } = useQuery({ queryKey: key, queryFn: () => apiGet<Choice[]>('/api/auth/notifications') });
  const save = useMutation({
    mutationFn: (c: { kind: string; enabled: boolean }) => api('PUT', '/api/auth/notifications', c),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: key }),
  });
  if (error) return <Alert tone="error">{error.message}</Alert>;
  if (!data) return <p>Loading…</p>;
  if (data.length === 0) return <p>None of Kerfwise’s e-mails apply to your roles.</p>;
  return (
    <fieldset className="space-y-2">
      <legend className="sr-only">E-mail notifications</legend>
      {data.map((c) => (
        <label key={c.kind} className="flex min-h-touch items-center gap-3">
          <input type="checkbox" className="h-6 w-6" checked={c.enabled} disabled={save.isPending} onChange={(e) => save.mutate({ kind: c.kind, enabled: e.target.checked })} />
          {c.label}
        </label>
      ))}
      {save.error && <Alert tone="error">{save.error.message}</Alert>}
    </fieldset>
  );
}
