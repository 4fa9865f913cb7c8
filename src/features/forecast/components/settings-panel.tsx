import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm, type FieldError, type FieldPath } from 'react-hook-form';
import { positionClassLabels } from '../../../../shared/cutters';
import type { DriveRateEstimate, EstimateBasis } from '../../../../shared/domain/forecast';
import { forecastSettingsInputSchema, type ForecastSettingsInput } from '../../../../shared/schemas/forecast';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useSaveForecastSettings, type GroundType } from '../api';
import { fixed } from '../format';

/** Inputs hold text; the schema wants numbers. Blank is "not given"; a decimal comma is read as a point. */
const asNumber = {
  setValueAs: (v: unknown) => (v === '' || v == null ? undefined : typeof v === 'number' ? v : Number(String(v).trim().replace(',', '.'))),
};
const message = (e: FieldError | undefined) => (!e ? undefined : e.type === 'invalid_type' ? 'Enter a number.' : e.message);
const cellInput =
  'block min-h-touch w-28 rounded-md border-2 border-basalt-300 bg-white px-2 text-body aria-[invalid=true]:border-alarm-500';

const inUse = (value: number | undefined, basis: EstimateBasis | null | undefined, decimals: number) =>
  value == null
    ? 'no strokes here yet: the most cautious known value stands in'
    : `${fixed(value, decimals)} in use, ${basis?.source === 'planner' ? 'set here' : `from the last ${basis?.strokeCount ?? '?'} strokes`}`;

/** Only the fields the schema knows: the server's answer also carries the row's project and time stamps. */
const formValues = (s: ForecastSettingsInput, groundTypes: GroundType[]): ForecastSettingsInput => ({
  classFactors: { centre: s.classFactors.centre, face: 1, gauge: s.classFactors.gauge },
  gehringSiteFactor: s.gehringSiteFactor,
  priorStrength: s.priorStrength,
  tipWidthMm: s.tipWidthMm,
  overcutMarginMm: s.overcutMarginMm,
  windowStrokes: s.windowStrokes,
  overrides: Object.fromEntries(groundTypes.map((g) => [g.id, { ...s.overrides[g.id] }])),
});

function SettingsForm({
  projectId,
  settings,
  groundTypes,
  driveRates,
  onDone,
}: {
  projectId: string;
  settings: ForecastSettingsInput;
  groundTypes: GroundType[];
  driveRates: DriveRateEstimate;
  onDone: (text: string) => void;
}) {
  const save = useSaveForecastSettings(projectId);
  const [error, setError] = useState<{ text: string; issues: string[] } | null>(null);
  const values = useMemo(() => formValues(settings, groundTypes), [settings, groundTypes]);
  const form = useForm<ForecastSettingsInput>({ resolver: zodResolver(forecastSettingsInputSchema), values });
  const e = form.formState.errors;

  const onSave = form.handleSubmit(
    async (input) => {
      setError(null);
      const overrides = Object.fromEntries(
        Object.entries(input.overrides).filter(([, o]) => o.penetrationMmPerRev !== undefined || o.advanceMPerDay !== undefined),
      );
      try {
        await save.mutateAsync({ ...input, overrides });
        onDone('Settings saved. The wear fit and the forecast are worked out again with them.');
      } catch (err) {
        const failure = serverErrors(err, form.setError, 'Saving failed. Try again.');
        setError({ text: failure.text, issues: failure.issues.map((i) => i.message) });
      }
    },
    () => setError({ text: 'Some settings need attention; they are marked below. Nothing was saved.', issues: [] }),
  );

  const field = (name: FieldPath<ForecastSettingsInput>, label: string, hint: string, fieldError: FieldError | undefined) => (
    <TextField label={label} hint={hint} inputMode="decimal" error={message(fieldError)} {...form.register(name, asNumber)} />
  );

  return (
    <form onSubmit={onSave} noValidate className="space-y-5">
      {error && (
        <Alert tone="error" title={error.text}>
          {error.issues.length > 0 && (
            <ul className="list-disc pl-5">
              {error.issues.map((i) => (
                <li key={i}>{i}</li>
              ))}
            </ul>
          )}
        </Alert>
      )}
      <fieldset className="space-y-3">
        <legend className="font-semibold">Wear fit</legend>
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {field(
            'classFactors.centre',
            'Centre class factor',
            `× the face-disc rate. ${positionClassLabels.face} discs are the reference: 1.`,
            e.classFactors?.centre,
          )}
          {field('classFactors.gauge', 'Gauge class factor', '× the face-disc rate.', e.classFactors?.gauge)}
          {field(
            'gehringSiteFactor',
            'Gehring site factor',
            'Scales every prior rate from the CAI; 1 takes it as published. More than 0.',
            e.gehringSiteFactor,
          )}
          {field(
            'priorStrength',
            'Prior weight (inspections)',
            'How many inspections the prior from the CAI is worth. 0 turns the blend off: the site’s own fit alone (a ground not yet inspected still starts from its CAI).',
            e.priorStrength,
          )}
          {field('tipWidthMm', 'Ring tip width (mm)', 'For the prior; about 19 mm on 17″ rings.', e.tipWidthMm)}
        </div>
      </fieldset>
      <fieldset className="space-y-3">
        <legend className="font-semibold">Forecast</legend>
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {field('overcutMarginMm', 'Overcut margin (mm, on the diameter)', 'Gauge bore loss beyond this is flagged.', e.overcutMarginMm)}
          {field(
            'windowStrokes',
            'Window (strokes)',
            'Recent strokes per ground that give penetration and advance per day.',
            e.windowStrokes,
          )}
        </div>
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="font-semibold">Per ground type: planner’s values</legend>
        <p className="max-w-prose text-caption text-basalt-600">
          Leave blank to use the recent strokes; a value here wins for ground ahead of the machine.
        </p>
        {groundTypes.length === 0 ? (
          <p>No ground types yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="text-left">
              <thead className="bg-basalt-100">
                <tr>
                  <th scope="col" className="px-2 py-2 font-semibold">
                    Ground type
                  </th>
                  <th scope="col" className="px-2 py-2 font-semibold">
                    Penetration (mm/rev)
                  </th>
                  <th scope="col" className="px-2 py-2 font-semibold">
                    Advance per day (m)
                  </th>
                </tr>
              </thead>
              <tbody>
                {groundTypes.map((g) => {
                  const cell = (key: 'penetrationMmPerRev' | 'advanceMPerDay', label: string, hint: string) => {
                    const err = message(e.overrides?.[g.id]?.[key]);
                    const id = `override-${g.id}-${key}`;
                    return (
                      <td className="px-2 py-2 align-top">
                        <input
                          id={id}
                          aria-label={`${label}, ${g.name}`}
                          inputMode="decimal"
                          aria-invalid={err ? true : undefined}
                          aria-describedby={`${id}-note`}
                          className={cellInput}
                          {...form.register(`overrides.${g.id}.${key}`, asNumber)}
                        />
                        <p id={`${id}-note`} className={`mt-1 text-caption ${err ? 'font-semibold text-alarm-700' : 'text-basalt-600'}`}>
                          {err ?? hint}
                        </p>
                      </td>
                    );
                  };
                  return (
                    <tr key={g.id} className="border-t border-basalt-100">
                      <th scope="row" className="px-2 py-2 text-left align-top font-semibold">
                        {g.name}
                      </th>
                      {cell(
                        'penetrationMmPerRev',
                        'Penetration',
                        inUse(driveRates.penetrationMmPerRevByGround[g.id], driveRates.basis[g.id]?.penetration, 2),
                      )}
                      {cell(
                        'advanceMPerDay',
                        'Advance per day',
                        inUse(driveRates.advanceMPerDayByGround[g.id], driveRates.basis[g.id]?.advance, 1),
                      )}
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
      </fieldset>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={form.formState.isSubmitting}>
          {form.formState.isSubmitting ? 'Saving…' : 'Save and recompute'}
        </Button>
        <Button variant="secondary" onClick={() => onDone('')}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** The settings the wear fit and forecast run with; the planner may change them. */
export function SettingsPanel({
  projectId,
  settings,
  groundTypes,
  driveRates,
  canEdit,
}: {
  projectId: string;
  settings: ForecastSettingsInput;
  groundTypes: GroundType[];
  driveRates: DriveRateEstimate;
  canEdit: boolean;
}) {
  const [editing, setEditing] = useState(false);
  const [saved, setSaved] = useState('');
  const overridden = groundTypes.filter(
    (g) => settings.overrides[g.id]?.penetrationMmPerRev != null || settings.overrides[g.id]?.advanceMPerDay != null,
  );
  return (
    <Panel title="Forecast settings">
      {saved && (
        <div className="mb-3">
          <Alert tone="success">{saved}</Alert>
        </div>
      )}
      {editing ? (
        <SettingsForm
          projectId={projectId}
          settings={settings}
          groundTypes={groundTypes}
          driveRates={driveRates}
          onDone={(text) => {
            setSaved(text);
            setEditing(false);
          }}
        />
      ) : (
        <div className="space-y-3">
          <dl className="grid gap-x-6 gap-y-1 sm:grid-cols-[max-content_1fr]">
            <dt className="font-semibold">Class factors</dt>
            <dd>
              Centre {settings.classFactors.centre} · Face 1 · Gauge {settings.classFactors.gauge}
            </dd>
            <dt className="font-semibold">Prior from the CAI</dt>
            <dd>
              {settings.priorStrength === 0
                ? `Off (weight 0): rates are the site’s own fit; grounds not yet inspected start from the CAI (Gehring site factor ${settings.gehringSiteFactor}, tip width ${settings.tipWidthMm} mm)`
                : `Gehring site factor ${settings.gehringSiteFactor}, worth ${settings.priorStrength} inspections, tip width ${settings.tipWidthMm} mm`}
            </dd>
            <dt className="font-semibold">Overcut margin</dt>
            <dd>{settings.overcutMarginMm} mm on the diameter</dd>
            <dt className="font-semibold">Penetration and advance</dt>
            <dd>
              From the last {settings.windowStrokes} strokes in each ground
              {overridden.length > 0 && `; set by the planner for ${overridden.map((g) => g.name).join(', ')}`}
            </dd>
          </dl>
          {canEdit && (
            <Button
              variant="secondary"
              onClick={() => {
                setSaved('');
                setEditing(true);
              }}
            >
              Change settings
            </Button>
          )}
        </div>
      )}
    </Panel>
  );
}
