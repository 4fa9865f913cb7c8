import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import type { z } from 'zod';
import { siteSettingsInputSchema, type SiteSettings, type SiteSettingsInput } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useSaveSettings } from '../api';

/** A blank number is "not given" (the schema names it); a decimal comma reads as a point. */
const asNumber = {
  setValueAs: (v: unknown) => (v === '' || v == null ? undefined : typeof v === 'number' ? v : Number(String(v).trim().replace(',', '.'))),
};

/** Shift pattern (site time), labour rate of cutter work, and the gap between strokes that counts as a standstill. */
export function SiteSettingsPanel({
  projectId,
  settings,
  canEdit,
  timeZone,
}: {
  projectId: string;
  settings: SiteSettings;
  canEdit: boolean;
  timeZone: string;
}) {
  const saveSettings = useSaveSettings(projectId);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const form = useForm<z.input<typeof siteSettingsInputSchema>, unknown, SiteSettingsInput>({
    resolver: zodResolver(siteSettingsInputSchema),
    defaultValues: { shifts: settings.shifts, labourRatePerHour: settings.labourRatePerHour, gapMinutes: settings.gapMinutes },
  });
  const shifts = useFieldArray({ control: form.control, name: 'shifts' });
  const e = form.formState.errors;

  const save = form.handleSubmit(async (input) => {
    setMessage(null);
    try {
      await saveSettings.mutateAsync(input);
      setMessage({ tone: 'success', text: 'Site settings saved; the reports use them from now on.' });
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'Saving failed. Try again.').text });
    }
  });

  if (!canEdit) {
    return (
      <Panel title="Site settings">
        <p>
          Shifts: {settings.shifts.map((s) => `${s.name} from ${s.start}`).join(', ')} ({timeZone}). Labour rate of cutter work{' '}
          {settings.labourRatePerHour.toFixed(2)} an hour. Standstills between strokes longer than {settings.gapMinutes} minutes are
          proposed as downtime.
        </p>
      </Panel>
    );
  }
  return (
    <Panel title="Site settings">
      <form onSubmit={save} noValidate className="space-y-4" aria-label="Site settings">
        {message && <Alert tone={message.tone}>{message.text}</Alert>}
        {!settings.saved && <p className="text-caption text-basalt-700">These are the defaults; save them to make them the site’s.</p>}
        <fieldset className="space-y-2">
          <legend className="font-semibold">Shifts (start in site time, {timeZone}; each runs until the next starts)</legend>
          {shifts.fields.map((s, i) => (
            <div key={s.id} className="flex flex-wrap items-end gap-3">
              <TextField label={`Shift ${i + 1} name`} {...form.register(`shifts.${i}.name`)} error={e.shifts?.[i]?.name?.message} />
              <TextField
                label={`Shift ${i + 1} starts`}
                type="time"
                {...form.register(`shifts.${i}.start`)}
                error={e.shifts?.[i]?.start?.message}
              />
              {shifts.fields.length > 1 && (
                <Button variant="ghost" onClick={() => shifts.remove(i)}>
                  Remove shift {i + 1}
                </Button>
              )}
            </div>
          ))}
          {(e.shifts?.message ?? e.shifts?.root?.message) && (
            <p className="text-caption font-semibold text-alarm-700">{e.shifts?.message ?? e.shifts?.root?.message}</p>
          )}
          {shifts.fields.length < 6 && (
            <Button variant="secondary" onClick={() => shifts.append({ name: '', start: '' })}>
              Add a shift
            </Button>
          )}
        </fieldset>
        <div className="grid gap-4 md:grid-cols-2">
          <TextField
            label="Labour rate of cutter work (per hour)"
            inputMode="decimal"
            {...form.register('labourRatePerHour', asNumber)}
            error={e.labourRatePerHour?.message}
            hint="The crew’s cost for one hour of cutter work, in the parts catalogue’s currency."
          />
          <TextField
            label="Standstill after (minutes between strokes)"
            inputMode="numeric"
            {...form.register('gapMinutes', asNumber)}
            error={e.gapMinutes?.message}
            hint="Longer gaps are proposed as downtime; shorter ones are ring building."
          />
        </div>
        <Button type="submit" disabled={form.formState.isSubmitting}>
          Save site settings
        </Button>
      </form>
    </Panel>
  );
}
