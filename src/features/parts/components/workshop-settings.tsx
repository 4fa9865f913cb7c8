import { useState, type FormEvent } from 'react';
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
import { ApiError } from '../../../lib/api-client';
import { useSaveWorkshop, type CataloguePart } from '../api';

type Bom = Record<WorkshopCondition, RebuildOutcomeInput>;
const allScrap = (): Bom => Object.fromEntries(workshopConditions.map((c) => [c.key, 'scrap'])) as Bom;
const cellControl = 'block min-h-touch rounded-md border-2 border-basalt-300 bg-white px-2';

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
}: {
  assembly: CataloguePart;
  bom: Bom;
  parts: CataloguePart[];
  onChange: (bom: Bom) => void;
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
  const [turnaround, setTurnaround] = useState(String(settings.turnaroundDays));
  const [maxRebuilds, setMaxRebuilds] = useState(String(settings.maxRebuilds));
  const [levelPct, setLevelPct] = useState(String(Number((settings.serviceLevel * 100).toFixed(1))));
  const [boms, setBoms] = useState<Record<string, Bom>>(() =>
    Object.fromEntries(assemblies.map((a) => [a.id, (settings.boms[a.id] as Bom | undefined) ?? allScrap()])),
  );
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string; issues?: string[] } | null>(null);

  const onSubmit = async (e: FormEvent) => {
    e.preventDefault();
    setMessage(null);
    const parsed = workshopSettingsInputSchema.safeParse({
      turnaroundDays: Number(turnaround.replace(',', '.')),
      maxRebuilds: Number(maxRebuilds),
      serviceLevel: Number(levelPct.replace(',', '.')) / 100,
      boms,
    });
    if (!parsed.success) {
      setMessage({
        tone: 'error',
        text: 'Some settings need attention; nothing was saved.',
        issues: parsed.error.issues.map((i) => i.message),
      });
      return;
    }
    try {
      await save.mutateAsync(parsed.data);
      setMessage({ tone: 'success', text: 'Workshop settings saved; the demand is worked out again with them.' });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Saving failed. Try again.' });
    }
  };

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
      {message && (
        <Alert tone={message.tone} title={message.text}>
          {message.issues && (
            <ul className="list-disc pl-5">
              {message.issues.map((i) => (
                <li key={i}>{i}</li>
              ))}
            </ul>
          )}
        </Alert>
      )}
      <Panel title="Workshop loop">
        <p className="mb-4 max-w-prose text-basalt-700">
          A removed cutter goes to the workshop and is rebuilt by its worst condition — or scrapped — and comes back to ready stock after
          the turnaround. A cutter already rebuilt the most times allowed is scrapped whatever its condition.
        </p>
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField label="Turnaround (days)" inputMode="decimal" value={turnaround} onChange={(e) => setTurnaround(e.target.value)} />
          <TextField
            label="Most rebuilds of one cutter"
            inputMode="numeric"
            value={maxRebuilds}
            onChange={(e) => setMaxRebuilds(e.target.value)}
          />
          <TextField
            label="Service level (%)"
            inputMode="decimal"
            value={levelPct}
            onChange={(e) => setLevelPct(e.target.value)}
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
          <BomEditor assembly={a} bom={boms[a.id]} parts={parts} onChange={(bom) => setBoms((b) => ({ ...b, [a.id]: bom }))} />
        </Panel>
      ))}
      <Button type="submit">Save the workshop settings</Button>
    </form>
  );
}
