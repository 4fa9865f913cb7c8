import { useQueryClient } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { downtimeEventInputSchema, type DowntimeCause, type DowntimeEventRow } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { ApiError } from '../../../lib/api-client';
import { formatChainage } from '../../../../shared/domain/chainage';
import { fromSiteInput, isoWithSiteOffset, toSiteInput } from '../../../../shared/site-time';
import { createEvent, deleteEvent, downtimeQueries, updateEvent, type StopOption } from '../api';

/** What a site time resolves to, with its UTC offset (so a daylight-saving hour is never a guess). */
function resolvedHint(value: string, timeZone: string): string {
  const at = fromSiteInput(value, timeZone);
  if (!at) return `Site time (${timeZone})`;
  const iso = isoWithSiteOffset(at, timeZone);
  const skipped = iso.slice(11, 16) !== value.slice(11, 16) ? ' — the clocks skip the time entered on this day' : '';
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)}, UTC${iso.slice(19)}${skipped}`;
}

/** Adds or edits a downtime event; times are entered in the site's time zone. */
export function EventForm({
  projectId,
  timeZone,
  causes,
  stops,
  editing,
  onDone,
}: {
  projectId: string;
  timeZone: string;
  causes: DowntimeCause[];
  stops: StopOption[];
  editing: DowntimeEventRow | null;
  onDone: (message: string) => void;
}) {
  const queryClient = useQueryClient();
  const [start, setStart] = useState(editing ? toSiteInput(editing.startAt, timeZone) : '');
  const [end, setEnd] = useState(editing ? toSiteInput(editing.endAt, timeZone) : '');
  const [causeId, setCauseId] = useState(editing?.causeId ?? '');
  const [stopId, setStopId] = useState(editing?.stopId ?? '');
  const [note, setNote] = useState(editing?.note ?? '');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  // An empty field gets a plain request; a filled one the rule it breaks (e.g. end before start).
  const timeError = (key: string, value: string, label: string) =>
    errors[key] && (value ? errors[key] : `Give the ${label} date and time.`);
  // Inactive causes are offered only to the event that already has one.
  const choosable = causes.filter((c) => c.active || c.id === editing?.causeId);

  const done = async (message: string) => {
    await queryClient.invalidateQueries({ queryKey: downtimeQueries.all(projectId) });
    onDone(message);
  };

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    setError(null);
    const parsed = downtimeEventInputSchema.safeParse({
      startAt: fromSiteInput(start, timeZone) ?? '',
      endAt: fromSiteInput(end, timeZone) ?? '',
      causeId: causeId || null,
      stopId: stopId || null,
      note,
    });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      if (editing) await updateEvent(projectId, editing.id, parsed.data);
      else await createEvent(projectId, parsed.data);
      await done(editing ? 'Downtime event saved.' : 'Downtime event added.');
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'Saving failed. Try again.');
    } finally {
      setBusy(false);
    }
  };

  const remove = async () => {
    if (!editing) return;
    setError(null);
    try {
      await deleteEvent(projectId, editing.id);
      await done('Downtime event deleted.');
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'Deleting failed. Try again.');
    }
  };

  return (
    <form
      onSubmit={submit}
      noValidate
      aria-label={editing ? 'Edit downtime event' : 'New downtime event'}
      className="space-y-4 rounded-md border border-basalt-200 bg-basalt-50 p-4"
    >
      <h3 className="font-semibold">{editing ? 'Edit downtime event' : 'New downtime event'}</h3>
      {error && <Alert tone="error">{error}</Alert>}
      <div className="grid gap-4 md:grid-cols-2">
        <TextField
          label="Start (site time)"
          type="datetime-local"
          value={start}
          onChange={(e) => setStart(e.target.value)}
          error={timeError('startAt', start, 'start')}
          hint={resolvedHint(start, timeZone)}
        />
        <TextField
          label="End (site time)"
          type="datetime-local"
          value={end}
          onChange={(e) => setEnd(e.target.value)}
          error={timeError('endAt', end, 'end')}
          hint={resolvedHint(end, timeZone)}
        />
        <SelectField label="Cause" value={causeId} onChange={(e) => setCauseId(e.target.value)} error={errors.causeId}>
          <option value="">— no cause yet —</option>
          {choosable.map((c) => (
            <option key={c.id} value={c.id}>
              {c.name}
              {c.cutterWork ? ' (cutter work)' : ''}
              {c.active ? '' : ' — not in use'}
            </option>
          ))}
        </SelectField>
        <SelectField label="Linked stop (optional)" value={stopId} onChange={(e) => setStopId(e.target.value)} error={errors.stopId}>
          <option value="">— none —</option>
          {stops.map((s) => (
            <option key={s.id} value={s.id}>
              {formatChainage(s.chainageM)}
              {s.ringNumber ? ` (ring ${s.ringNumber})` : ''} — {s.status.replace('_', ' ')}
            </option>
          ))}
        </SelectField>
        <div className="md:col-span-2">
          <TextField label="Note" value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} error={errors.note} />
        </div>
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={busy}>
          {editing ? 'Save event' : 'Add event'}
        </Button>
        <Button variant="ghost" onClick={() => onDone('')}>
          Cancel
        </Button>
        {editing &&
          (confirming ? (
            <Button variant="danger" className="ml-auto" onClick={remove}>
              Delete this event for good
            </Button>
          ) : (
            <Button variant="secondary" className="ml-auto" onClick={() => setConfirming(true)}>
              Delete event
            </Button>
          ))}
      </div>
    </form>
  );
}
