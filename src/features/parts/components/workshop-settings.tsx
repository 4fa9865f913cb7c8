import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm, type FieldErrors } from 'react-hook-form';
import { z } from 'zod';
import {
  workshopConditions,
  workshopSettingsInputSchema,
  type RebuildOutcomeInput,
  type WorkshopCondition,
  type WorkshopSettingsInput,
} from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useSaveWorkshop, type CataloguePart } from '../api';

type Bom = Record<WorkshopCondition, RebuildOutcomeInput>;
const allScrap = (): Bom => Object.fromEntries(workshopConditions.map((c) => [c.key, 'scrap'])) as Bom;
const cellControl = 'block min-h-touch rounded-md border-2 border-basalt-300 bg-white px-2 aria-[invalid=true]:border-alarm-500';

/** What the form holds: the numbers as typed (the service level in per cent) and the bills of materials. */
interface WorkshopForm {
  turnaroundDays: string;
  maxRebuilds: string;
  serviceLevel: string;
  boms: Record<string, Bom>;
}
/** A blank number is "not given" (the schema names it); a decimal comma reads as a point. */
const toNumber = (text: string) => (text.trim() === '' ? undefined : Number(text.trim().replace(',', '.')));
/** The form turned into the request and checked with the server's schema; the field names are the request's, so errors land on them. */
const workshopFormSchema = z
  .object({ turnaroundDays: z.string(), maxRebuilds: z.string(), serviceLevel: z.string(), boms: z.record(z.string(), z.any()) })
  .transform((v): z.input<typeof workshopSettingsInputSchema> => ({
    turnaroundDays: toNumber(v.turnaroundDays) as number,
    maxRebuilds: toNumber(v.maxRebuilds) as number,
    serviceLevel: (toNumber(v.serviceLevel) as number) / 100,
    boms: v.boms as WorkshopSettingsInput['boms'],
  }))
  .pipe(workshopSettingsInputSchema);
/** One line's problem (its part or its quantity), from the client's check or the server's refusal. */
type LineErrors = (condition: WorkshopCondition, line: number) => string | undefined;

function outcomeText(outcome: RebuildOutcomeInput, parts: CataloguePart[]): string {
  if (outcome === 'scrap') return 'Scrap';
  if (outcome.length === 0) return 'Rebuild, no parts';
  return `Rebuild: ${outcome.map((l) => `${l.qty} × ${parts.find((p) => p.id === l.partId)?.code ?? '?'}`).join(', ')}`;
}

/** One assembly's bill of materials per condition: scrap, or rebuild with a list of parts. */
function BomEditor({
  assembly,
  bom,
  parts,
  onChange,
  lineError,
}: {
  assembly: CataloguePart;
  bom: Bom;
  parts: CataloguePart[];
  onChange: (bom: Bom) => void;
  lineError: LineErrors;
}) {
  const rebuildParts = parts.filter((p) => p.kind !== 'cutter-assembly');
  const set = (c: WorkshopCondition, outcome: RebuildOutcomeInput) => onChange({ ...bom, [c]: outcome });
  return (
    <div className="overflow-x-auto">
      <table className="min-w-full text-left" aria-label={`Bill of materials of ${assembly.code}`}>
        <thead className="bg-basalt-100">
          <tr>
            {['Condition of the removed cutter', 'Outcome', 'Parts for the rebuild'].map((h) => (
              <th key={h} scope="col" className="px-3 py-2 font-semibold">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {workshopConditions.map((c) => {
            const outcome = bom[c.key];
            return (
              <tr key={c.key} className="border-t border-basalt-100 align-top">
                <th scope="row" className="px-3 py-2 font-normal">
                  {c.label}
                </th>
                <td className="px-3 py-2">
                  <select
                    aria-label={`Outcome for ${c.label}`}
                    className={cellControl}
                    value={outcome === 'scrap' ? 'scrap' : 'rebuild'}
                    onChange={(e) => set(c.key, e.target.value === 'scrap' ? 'scrap' : [])}
                  >
                    <option value="rebuild">Rebuild</option>
                    <option value="scrap">Scrap</option>
                  </select>
                </td>
                <td className="px-3 py-2">
                  {outcome === 'scrap' ? (
                    '—'
                  ) : (
                    <div className="space-y-2">
                      {outcome.map((line, i) => (
                        <div key={i} className="flex flex-wrap items-center gap-2">
                          <select
                            aria-label={`Part ${i + 1} for ${c.label}`}
                            aria-invalid={lineError(c.key, i) ? true : undefined}
                            aria-describedby={lineError(c.key, i) ? `bom-${assembly.id}-${c.key}-${i}-error` : undefined}
                            className={cellControl}
                            value={line.partId}
                            onChange={(e) =>
                              set(
                                c.key,
                                outcome.map((l, k) => (k === i ? { ...l, partId: e.target.value } : l)),
                              )
                            }
                          >
                            {rebuildParts.map((p) => (
                              <option key={p.id} value={p.id}>
                                {p.code} — {p.name}
                              </option>
                            ))}
                          </select>
                          <input
                            aria-label={`Quantity of part ${i + 1} for ${c.label}`}
                            inputMode="decimal"
                            className={`${cellControl} w-20`}
                            value={line.qty}
                            onChange={(e) =>
                              set(
                                c.key,
                                outcome.map((l, k) => (k === i ? { ...l, qty: Number(e.target.value.replace(',', '.')) } : l)),
                              )
                            }
                          />
                          <Button
                            variant="ghost"
                            onClick={() =>
                              set(
                                c.key,
                                outcome.filter((_, k) => k !== i),
                              )
                            }
                          >
                            Remove
                          </Button>
                          {lineError(c.key, i) && (
                            <p id={`bom-${assembly.id}-${c.key}-${i}-error`} className="w-full text-caption font-semibold text-alarm-700">
                              {lineError(c.key, i)}
                            </p>
                          )}
                        </div>
                      ))}
                      {rebuildParts.length > 0 && (
                        <Button variant="secondary" onClick={() => set(c.key, [...outcome, { partId: rebuildParts[0].id, qty: 1 }])}>
                          Add a part
                        </Button>
                      )}
                    </div>
                  )}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

/** The workshop loop: turnaround, most rebuilds, service level and the bills of materials; the buyer edits, others read. */
export function WorkshopSettings({
  projectId,
  settings,
  parts,
  canEdit,
}: {
  projectId: string;
  settings: WorkshopSettingsInput;
  parts: CataloguePart[];
  canEdit: boolean;
}) {
  const save = useSaveWorkshop(projectId);
  const assemblies = parts.filter((p) => p.kind === 'cutter-assembly');
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const form = useForm<WorkshopForm, unknown, WorkshopSettingsInput>({
    resolver: zodResolver(workshopFormSchema),
    defaultValues: {
      turnaroundDays: String(settings.turnaroundDays),
      maxRebuilds: String(settings.maxRebuilds),
      serviceLevel: String(Number((settings.serviceLevel * 100).toFixed(1))),
      boms: Object.fromEntries(assemblies.map((a) => [a.id, (settings.boms[a.id] as Bom | undefined) ?? allScrap()])),
    },
  });
  const e = form.formState.errors;
  const boms = form.watch('boms');
  const lineError =
    (assemblyId: string): LineErrors =>
    (condition, line) => {
      const lines = (e.boms as Record<string, FieldErrors<Bom>> | undefined)?.[assemblyId]?.[condition] as
        Record<number, { partId?: { message?: string }; qty?: { message?: string } }> | undefined;
      return lines?.[line]?.partId?.message ?? lines?.[line]?.qty?.message;
    };

  const onSubmit = form.handleSubmit(
    async (input) => {
      setMessage(null);
      try {
        await save.mutateAsync(input);
        setMessage({ tone: 'success', text: 'Workshop settings saved; the demand is worked out again with them.' });
      } catch (err) {
        setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'Saving failed. Try again.').text });
      }
    },
    () => setMessage({ tone: 'error', text: 'Some settings need attention; nothing was saved.' }),
  );

  if (!canEdit) {
    return (
      <Panel title="Workshop loop">
        <p>
          Turnaround {settings.turnaroundDays} days; at most {settings.maxRebuilds} rebuilds; service level{' '}
          {(settings.serviceLevel * 100).toFixed(1)} %.
        </p>
        {assemblies.map((a) => (
          <div key={a.id} className="mt-4">
            <h3 className="font-semibold">
              {a.code} — {a.name}
            </h3>
            <ul className="list-disc pl-5">
              {workshopConditions.map((c) => (
                <li key={c.key}>
                  {c.label}: {outcomeText((settings.boms[a.id] as Bom | undefined)?.[c.key] ?? 'scrap', parts)}
                </li>
              ))}
            </ul>
          </div>
        ))}
      </Panel>
    );
  }
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-6">
      {message && <Alert tone={message.tone} title={message.text} />}
      <Panel title="Workshop loop">
        <p className="mb-4 max-w-prose text-basalt-700">
          A removed cutter goes to the workshop and is rebuilt by its worst condition — or scrapped — and comes back to ready stock after
          the turnaround. A cutter already rebuilt the most times allowed is scrapped whatever its condition.
        </p>
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField label="Turnaround (days)" inputMode="decimal" {...form.register('turnaroundDays')} error={e.turnaroundDays?.message} />
          <TextField
            label="Most rebuilds of one cutter"
            inputMode="numeric"
            {...form.register('maxRebuilds')}
            error={e.maxRebuilds?.message}
          />
          <TextField
            label="Service level (%)"
            inputMode="decimal"
            {...form.register('serviceLevel')}
            error={e.serviceLevel?.message}
            hint="Chance of not running out during a lead time: 95 % is common."
          />
        </div>
      </Panel>
      {assemblies.length === 0 && (
        <Alert tone="caution">Add a complete cutter assembly to the catalogue to give it a bill of materials.</Alert>
      )}
      {assemblies.map((a) => (
        <Panel key={a.id} title={`${a.code} — ${a.name}`}>
          {!settings.boms[a.id] && (
            <div className="mb-3">
              <Alert tone="caution">
                No bill of materials saved yet: until there is one, every removed cutter of this assembly counts as scrapped.
              </Alert>
            </div>
          )}
          <BomEditor
            assembly={a}
            bom={boms[a.id]}
            parts={parts}
            onChange={(bom) => form.setValue(`boms.${a.id}`, bom, { shouldDirty: true })}
            lineError={lineError(a.id)}
          />
        </Panel>
      ))}
      <Button type="submit" disabled={form.formState.isSubmitting}>
        Save the workshop settings
      </Button>
    </form>
  );
}
