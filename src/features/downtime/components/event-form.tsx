import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import {
  downtimeEventInputSchema,
  type DowntimeCause,
  type DowntimeEventInput,
  type DowntimeEventRow,
} from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { serverErrors } from '../../../lib/form';
import { formatChainage } from '../../../../shared/domain/chainage';
import { fromSiteInput, isoWithSiteOffset, toSiteInput } from '../../../../shared/site-time';
import { useDeleteEvent, useSaveEvent, type StopOption } from '../api';

/** What the form holds: site times as typed, '' for "no cause" / "no stop". */
interface EventFormValues {
  startAt: string;
  endAt: string;
  causeId: string;
  stopId: string;
  note: string;
}

/** The form's values turned into the request, then checked with the server's own schema (same field names, so errors land on the fields). */
const eventFormSchema = (timeZone: string) =>
  z
    .object({ startAt: z.string(), endAt: z.string(), causeId: z.string(), stopId: z.string(), note: z.string() })
    .transform((v): z.input<typeof downtimeEventInputSchema> => ({
      startAt: fromSiteInput(v.startAt, timeZone) ?? '',
      endAt: fromSiteInput(v.endAt, timeZone) ?? '',
      causeId: v.causeId || null,
      stopId: v.stopId || null,
      note: v.note,
    }))
    .pipe(downtimeEventInputSchema);

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
  const save = useSaveEvent(projectId);
  const del = useDeleteEvent(projectId);
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const form = useForm<EventFormValues, unknown, DowntimeEventInput>({
    resolver: zodResolver(eventFormSchema(timeZone)),
    defaultValues: {
      startAt: editing ? toSiteInput(editing.startAt, timeZone) : '',
      endAt: editing ? toSiteInput(editing.endAt, timeZone) : '',
      causeId: editing?.causeId ?? '',
      stopId: editing?.stopId ?? '',
      note: editing?.note ?? '',
    },
  });
  const e = form.formState.errors;
  const [start, end] = form.watch(['startAt', 'endAt']);
  // An empty field gets a plain request; a filled one the rule it breaks (e.g. end before start).
  const timeError = (message: string | undefined, value: string, label: string) =>
    message && (value ? message : `Give the ${label} date and time.`);
  // Inactive causes are offered only to the event that already has one.
  const choosable = causes.filter((c) => c.active || c.id === editing?.causeId);

  const submit = form.handleSubmit(async (input) => {
    setError(null);
    try {
      await save.mutateAsync({ eventId: editing?.id ?? null, input });
      onDone(editing ? 'Downtime event saved.' : 'Downtime event added.');
    } catch (err) {
      setError(serverErrors(err, form.setError, 'Saving failed. Try again.').text);
    }
  });

  const remove = async () => {
    if (!editing) return;
    setError(null);
    try {
      await del.mutateAsync(editing.id);
      onDone('Downtime event deleted.');
    } catch (err) {
      setError(serverErrors(err, form.setError, 'Deleting failed. Try again.').text);
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
          {...form.register('startAt')}
          error={timeError(e.startAt?.message, start, 'start')}
          hint={resolvedHint(start, timeZone)}
        />
        <TextField
          label="End (site time)"
          type="datetime-local"
          {...form.register('endAt')}
          error={timeError(e.endAt?.message, end, 'end')}
          hint={resolvedHint(end, timeZone)}
        />
        <SelectField label="Cause" {...form.register('causeId')} error={e.causeId?.message}>
          <option value="">— no cause yet —</option>
          {choosable.map((c) => (
            <option key={c.id} value={c.id}>
              {c.name}
              {c.cutterWork ? ' (cutter work)' : ''}
              {c.active ? '' : ' — not in use'}
            </option>
          ))}
        </SelectField>
        <SelectField label="Linked stop (optional)" {...form.register('stopId')} error={e.stopId?.message}>
          <option value="">— none —</option>
          {stops.map((s) => (
            <option key={s.id} value={s.id}>
              {formatChainage(s.chainageM)}
              {s.ringNumber ? ` (ring ${s.ringNumber})` : ''} — {s.status.replace('_', ' ')}
            </option>
          ))}
        </SelectField>
        <div className="md:col-span-2">
          <TextField label="Note" maxLength={2000} {...form.register('note')} error={e.note?.message} />
        </div>
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={form.formState.isSubmitting}>
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
