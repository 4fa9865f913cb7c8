import { zodResolver } from '@hookform/resolvers/zod';
import { Fragment, useMemo, useState } from 'react';
import { useFieldArray, useForm, type Resolver } from 'react-hook-form';
import type { z } from 'zod';
import type { GeologyGapWarning } from '../../../../shared/domain/geology';
import { longSectionInputSchema } from '../../../../shared/schemas/geology';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { formatChainage } from '../../../../shared/domain/chainage';
import { useSaveLongSection, type GeologySection, type GroundType } from '../api';

type LongSection = z.infer<typeof longSectionInputSchema>;

/** Form rows hold what the inputs hold; the shared schema checks them on submit. */
interface FormRow {
  chainageFromM: number | string | undefined;
  chainageToM: number | string | undefined;
  groundTypeId: string;
  waterHeadM: number | string | undefined;
  stopAllowed: boolean;
  stopReason: string;
}
interface LongSectionForm {
  sections: FormRow[];
}

const fieldLabels: Record<keyof FormRow, string> = {
  chainageFromM: 'Chainage from (m)',
  chainageToM: 'Chainage to (m)',
  groundTypeId: 'Ground type',
  waterHeadM: 'Water head above axis (m)',
  stopAllowed: 'Stop allowed',
  stopReason: 'Stop reason',
};

/** A blank number is "missing" (zod says so); a decimal comma is read as a point. */
const asNumber = {
  setValueAs: (v: unknown) => (v === '' || v == null ? undefined : typeof v === 'number' ? v : Number(String(v).replace(',', '.'))),
};
const cellInput = 'block min-h-touch rounded-md border-2 border-basalt-300 bg-white px-2 text-body aria-[invalid=true]:border-alarm-500';

const toRows = (sections: GeologySection[]): FormRow[] =>
  sections.map(({ chainageFromM, chainageToM, groundTypeId, waterHeadM, stopAllowed, stopReason }) => ({
    chainageFromM,
    chainageToM,
    groundTypeId,
    waterHeadM,
    stopAllowed,
    stopReason,
  }));

/** Gaps in words: "2+520 to 2+540, …". */
export const gapText = (warnings: GeologyGapWarning[]) =>
  warnings.map((w) => `${formatChainage(w.fromM)} to ${formatChainage(w.toM)}`).join(', ');

/** The long section as an editable table, saved as a whole (PUT); the server's problems are shown on their rows. */
export function LongSectionEditor({
  projectId,
  sections,
  groundTypes,
}: {
  projectId: string;
  sections: GeologySection[];
  groundTypes: GroundType[];
}) {
  const save = useSaveLongSection(projectId);
  const [message, setMessage] = useState<{ tone: 'success' | 'error' | 'caution'; text: string; lines?: string[] } | null>(null);
  const values = useMemo(() => ({ sections: toRows(sections) }), [sections]);
  const form = useForm<LongSectionForm, unknown, LongSection>({
    resolver: zodResolver(longSectionInputSchema) as unknown as Resolver<LongSectionForm, unknown, LongSection>,
    values,
  });
  const { fields, append, remove } = useFieldArray({ control: form.control, name: 'sections' });
  const errors = form.formState.errors.sections;

  const onSave = form.handleSubmit(
    async (input) => {
      setMessage(null);
      try {
        const saved = await save.mutateAsync(input.sections);
        setMessage(
          saved.warnings.length
            ? {
                tone: 'caution',
                text: `Long section saved: ${saved.saved} sections. It has gaps of unknown ground: ${gapText(saved.warnings)}.`,
              }
            : { tone: 'success', text: `Long section saved: ${saved.saved} sections, no gaps.` },
        );
      } catch (err) {
        const failure = serverErrors(err, form.setError, 'Saving failed. Try again.');
        const lines = failure.issues.map((issue) => {
          const m = /^sections\.(\d+)\.(\w+)$/.exec(issue.path);
          return m ? `Row ${Number(m[1]) + 1}, ${fieldLabels[m[2] as keyof FormRow] ?? m[2]}: ${issue.message}` : issue.message;
        });
        setMessage({ tone: 'error', text: failure.text, lines });
      }
    },
    () => setMessage({ tone: 'error', text: 'Some rows need attention; they are marked below. Nothing was saved.' }),
  );

  const addRow = () => {
    const last = form.getValues('sections').at(-1);
    append({
      chainageFromM: last?.chainageToM ?? '',
      chainageToM: '',
      groundTypeId: last?.groundTypeId ?? groundTypes[0]?.id ?? '',
      waterHeadM: last?.waterHeadM ?? 0,
      stopAllowed: true,
      stopReason: '',
    });
  };

  const fieldError = (i: number, f: keyof FormRow) => errors?.[i]?.[f]?.message;
  const problemsId = (i: number) => `section-row-${i}-problems`;
  const invalid = (i: number, f: keyof FormRow) => (fieldError(i, f) ? { 'aria-invalid': true, 'aria-describedby': problemsId(i) } : {});
  const numberCell = (i: number, f: 'chainageFromM' | 'chainageToM' | 'waterHeadM', width: string) => (
    <td className="px-1 py-1 align-top">
      <input
        aria-label={`${fieldLabels[f]}, row ${i + 1}`}
        inputMode="decimal"
        className={`${cellInput} ${width}`}
        {...invalid(i, f)}
        {...form.register(`sections.${i}.${f}`, asNumber)}
      />
    </td>
  );

  return (
    <Panel title="Edit the long section">
      <form onSubmit={onSave} noValidate className="space-y-4" aria-label="Long section">
        {message && (
          <Alert tone={message.tone} title={message.text}>
            {message.lines && message.lines.length > 0 && (
              <ul className="list-disc pl-6">
                {message.lines.map((t, i) => (
                  <li key={i}>{t}</li>
                ))}
              </ul>
            )}
          </Alert>
        )}
        {groundTypes.length === 0 && (
          <Alert tone="info">Add a ground type first (above), or import a long section: its ground types are created by name.</Alert>
        )}
        <div className="relative overflow-x-auto rounded-lg border border-basalt-200">
          <table className="min-w-full text-left">
            <thead className="bg-basalt-100 text-caption">
              <tr>
                {['Row', 'From (m)', 'To (m)', 'Ground type', 'Water head (m)', 'Stop allowed', 'Stop reason', ''].map((h, i) => (
                  <th key={i} scope="col" className="px-1 py-2 font-semibold">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {fields.length === 0 && (
                <tr>
                  <td colSpan={8} className="px-3 py-4 text-basalt-600">
                    No sections yet. Import a CSV file below, or add them one by one.
                  </td>
                </tr>
              )}
              {fields.map((field, i) => {
                const problems = (Object.keys(fieldLabels) as (keyof FormRow)[]).flatMap((f) => {
                  const text = fieldError(i, f);
                  return text ? [{ f, text }] : [];
                });
                return (
                  <Fragment key={field.id}>
                    <tr className={`border-t border-basalt-100 ${problems.length ? 'bg-alarm-100' : 'bg-white'}`}>
                      <td className="px-2 py-1 align-middle text-caption text-basalt-600">{i + 1}</td>
                      {numberCell(i, 'chainageFromM', 'w-20')}
                      {numberCell(i, 'chainageToM', 'w-20')}
                      <td className="px-1 py-1 align-top">
                        <select
                          aria-label={`${fieldLabels.groundTypeId}, row ${i + 1}`}
                          className={`${cellInput} w-32`}
                          {...invalid(i, 'groundTypeId')}
                          {...form.register(`sections.${i}.groundTypeId`)}
                        >
                          <option value="">— choose —</option>
                          {groundTypes.map((g) => (
                            <option key={g.id} value={g.id}>
                              {g.name}
                            </option>
                          ))}
                        </select>
                      </td>
                      {numberCell(i, 'waterHeadM', 'w-16')}
                      <td className="px-1 py-1 text-center align-top">
                        <label className="inline-flex min-h-touch min-w-touch items-center justify-center">
                          <span className="sr-only">
                            {fieldLabels.stopAllowed}, row {i + 1}
                          </span>
                          <input type="checkbox" className="size-6 accent-ember-600" {...form.register(`sections.${i}.stopAllowed`)} />
                        </label>
                      </td>
                      <td className="px-1 py-1 align-top">
                        <input
                          aria-label={`${fieldLabels.stopReason}, row ${i + 1}`}
                          className={`${cellInput} w-full min-w-32`}
                          {...invalid(i, 'stopReason')}
                          {...form.register(`sections.${i}.stopReason`)}
                        />
                      </td>
                      <td className="px-1 py-1 align-top">
                        <Button variant="ghost" aria-label={`Remove row ${i + 1}`} title="Remove this section" onClick={() => remove(i)}>
                          ✕
                        </Button>
                      </td>
                    </tr>
                    {problems.length > 0 && (
                      <tr className="bg-alarm-100">
                        <td colSpan={8} id={problemsId(i)} className="px-2 pb-2 text-caption font-semibold text-alarm-700">
                          {problems.map((p) => (
                            <p key={p.f}>
                              {fieldLabels[p.f]}: {p.text}
                            </p>
                          ))}
                        </td>
                      </tr>
                    )}
                  </Fragment>
                );
              })}
            </tbody>
          </table>
        </div>
        <div className="flex flex-wrap gap-2">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            Save long section
          </Button>
          <Button variant="secondary" disabled={groundTypes.length === 0} onClick={addRow}>
            Add a section
          </Button>
          <Button
            variant="ghost"
            disabled={!form.formState.isDirty}
            onClick={() => {
              form.reset(values);
              setMessage(null);
            }}
          >
            Undo changes
          </Button>
        </div>
        <p className="text-caption text-basalt-600">
          Give the lower chainage as “from”, whatever the drive direction. Sections may not overlap; a gap is allowed but the forecast takes
          the most cautious known ground there. Saving replaces the whole long section and recomputes the rolled distance of every disc.
        </p>
      </form>
    </Panel>
  );
}
