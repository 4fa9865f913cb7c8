import { useState, type FormEvent } from 'react';
import { siteSettingsInputSchema, type SiteSettings } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useSaveSettings } from '../api';

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
  const [shifts, setShifts] = useState(settings.shifts);
  const [rate, setRate] = useState(String(settings.labourRatePerHour));
  const [gap, setGap] = useState(String(settings.gapMinutes));
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);

  const save = async (e: FormEvent) => {
    e.preventDefault();
    setMessage(null);
    const parsed = siteSettingsInputSchema.safeParse({
      shifts,
      labourRatePerHour: Number(rate.replace(',', '.')),
      gapMinutes: Number(gap),
    });
    if (!parsed.success) return setMessage({ tone: 'error', text: parsed.error.issues[0].message });
    try {
      await saveSettings.mutateAsync(parsed.data);
      setMessage({ tone: 'success', text: 'Site settings saved; the reports use them from now on.' });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Saving failed. Try again.' });
    }
  };

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
  const setShift = (i: number, patch: Partial<{ name: string; start: string }>) =>
    setShifts(shifts.map((s, k) => (k === i ? { ...s, ...patch } : s)));
  return (
    <Panel title="Site settings">
      <form onSubmit={save} noValidate className="space-y-4" aria-label="Site settings">
        {message && <Alert tone={message.tone}>{message.text}</Alert>}
        {!settings.saved && <p className="text-caption text-basalt-700">These are the defaults; save them to make them the site’s.</p>}
        <fieldset className="space-y-2">
          <legend className="font-semibold">Shifts (start in site time, {timeZone}; each runs until the next starts)</legend>
          {shifts.map((s, i) => (
            <div key={i} className="flex flex-wrap items-end gap-3">
              <TextField label={`Shift ${i + 1} name`} value={s.name} onChange={(e) => setShift(i, { name: e.target.value })} />
              <TextField
                label={`Shift ${i + 1} starts`}
                type="time"
                value={s.start}
                onChange={(e) => setShift(i, { start: e.target.value })}
              />
              {shifts.length > 1 && (
                <Button variant="ghost" onClick={() => setShifts(shifts.filter((_, k) => k !== i))}>
                  Remove shift {i + 1}
                </Button>
              )}
            </div>
          ))}
          {shifts.length < 6 && (
            <Button variant="secondary" onClick={() => setShifts([...shifts, { name: '', start: '' }])}>
              Add a shift
            </Button>
          )}
        </fieldset>
        <div className="grid gap-4 md:grid-cols-2">
          <TextField
            label="Labour rate of cutter work (per hour)"
            inputMode="decimal"
            value={rate}
            onChange={(e) => setRate(e.target.value)}
            hint="The crew’s cost for one hour of cutter work, in the parts catalogue’s currency."
          />
          <TextField
            label="Standstill after (minutes between strokes)"
            inputMode="numeric"
            value={gap}
            onChange={(e) => setGap(e.target.value)}
            hint="Longer gaps are proposed as downtime; shorter ones are ring building."
          />
        </div>
        <Button type="submit">Save site settings</Button>
      </form>
    </Panel>
  );
}
