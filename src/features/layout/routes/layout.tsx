import { zodResolver } from '@hookform/resolvers/zod';
import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { Fragment, useMemo, useState, type ChangeEvent } from 'react';
import { useFieldArray, useForm, type FieldPath, type Resolver } from 'react-hook-form';
import { useParams } from 'react-router';
import { positionClasses, positionClassLabels, type PositionClass } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { layoutInputSchema, type LayoutInput, type PositionInput } from '../../../../shared/schemas/cutterhead';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { Page, Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { downloadCsv, toCsv } from '../../../lib/csv';
import { projectQueries } from '../../projects/api';
import { layoutQueries, useImportLayoutCsv, useSaveLayout, type LayoutSaved, type LayoutPosition } from '../api';
import { layOutAnglesDeg } from '../head-geometry';

/** The columns the importer reads (server/routes/positions.ts), by the field each fills. */
const csvColumnOf: Record<keyof PositionInput, string> = {
  number: 'number',
  trackRadiusMm: 'track_radius_mm',
  positionClass: 'class',
  discSizeIn: 'disc_size_in',
  tiltDeg: 'tilt_deg',
  wearLimitMm: 'wear_limit_mm',
  twinDisc: 'twin_disc',
  angleDeg: 'angle_deg',
};
const csvFields = Object.keys(csvColumnOf) as (keyof PositionInput)[];

function layoutCsv(positions: LayoutPosition[]): string {
  return toCsv(
    csvFields.map((f) => csvColumnOf[f]),
    positions.map((p) => csvFields.map((f) => (f === 'twinDisc' ? (p.twinDisc ? 'yes' : 'no') : p[f]))),
  );
}

/** Form rows hold what the inputs hold; the shared schema coerces them on submit. */
interface FormRow {
  number: number | string | undefined;
  trackRadiusMm: number | string | undefined;
  positionClass: PositionClass;
  discSizeIn: number | string | undefined;
  tiltDeg: number | string | null;
  wearLimitMm: number | string | undefined;
  twinDisc: boolean;
  angleDeg: number | string | null;
}
interface LayoutForm {
  positions: FormRow[];
}

const toRows = (positions: LayoutPosition[]): FormRow[] =>
  positions.map(({ number, trackRadiusMm, positionClass, discSizeIn, tiltDeg, wearLimitMm, twinDisc, angleDeg }) => ({
    number,
    trackRadiusMm,
    positionClass,
    discSizeIn,
    tiltDeg,
    wearLimitMm,
    twinDisc,
    angleDeg,
  }));

const blankRow = (after: FormRow | undefined): FormRow => ({
  number: after ? Number(after.number) + 1 || '' : 1,
  trackRadiusMm: '',
  positionClass: after?.positionClass ?? 'face',
  discSizeIn: after?.discSizeIn ?? 17,
  tiltDeg: null,
  wearLimitMm: after?.wearLimitMm ?? '',
  twinDisc: false,
  angleDeg: null,
});

const fieldLabels: Record<keyof FormRow, string> = {
  number: 'Position number',
  trackRadiusMm: 'Track radius in mm',
  positionClass: 'Class',
  discSizeIn: 'Disc size in inches',
  tiltDeg: 'Tilt in degrees',
  wearLimitMm: 'Wear limit in mm',
  twinDisc: 'Twin discs',
  angleDeg: 'Angle in degrees',
};

/** Blank inputs: required numbers become undefined (zod says "must be a number"), optional ones null. */
const required = { setValueAs: (v: unknown) => (v === '' ? undefined : v) };
const optional = { setValueAs: (v: unknown) => (v === '' || v == null ? null : v) };
const cellInput =
  'block min-h-touch rounded-md border-2 border-basalt-300 bg-white px-2 text-body aria-[invalid=true]:border-alarm-500 [&[readonly]]:bg-basalt-100';

const savedText = (r: LayoutSaved) => `${r.created} new, ${r.updated} changed, ${r.unchanged} unchanged.`;

function LayoutEditor({ projectId, positions }: { projectId: string; positions: LayoutPosition[] }) {
  const save = useSaveLayout(projectId);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string; issues?: string[] } | null>(null);
  const values = useMemo(() => ({ positions: toRows(positions) }), [positions]);
  const form = useForm<LayoutForm, unknown, LayoutInput>({
    resolver: zodResolver(layoutInputSchema) as unknown as Resolver<LayoutForm, unknown, LayoutInput>,
    values,
  });
  const { fields, append, remove } = useFieldArray({ control: form.control, name: 'positions' });
  const errors = form.formState.errors.positions;
  // Saved rows keep their number (the server matches rows by it) and cannot be removed here:
  // a saved position has history. Rows added since the last save can be.
  const savedCount = positions.length;

  const onSave = form.handleSubmit(
    async (input) => {
      setMessage(null);
      try {
        const saved = await save.mutateAsync(input);
        setMessage({ tone: 'success', text: `Layout saved: ${savedText(saved)} Changes to wear limits are kept in the audit log.` });
      } catch (err) {
        if (!(err instanceof ApiError)) {
          setMessage({ tone: 'error', text: 'Saving failed. Try again.' });
          return;
        }
        const rows = form.getValues('positions');
        const issues = err.issues.map((issue) => {
          const m = /^positions\.(\d+)\.(\w+)$/.exec(issue.path);
          if (!m) return issue.message;
          form.setError(issue.path as FieldPath<LayoutForm>, { type: 'server', message: issue.message });
          return `Row ${Number(m[1]) + 1} (position ${rows[Number(m[1])]?.number ?? '?'}): ${issue.message}`;
        });
        setMessage({ tone: 'error', text: err.message, issues });
      }
    },
    () => setMessage({ tone: 'error', text: 'Some rows need attention; they are marked below. Nothing was saved.' }),
  );

  const layOutEvenly = () => {
    const rows = form.getValues('positions');
    const slots = rows.map((r) => ({
      trackRadiusMm: Number(r.trackRadiusMm) || 0,
      angleDeg: r.angleDeg == null || r.angleDeg === '' ? null : Number(r.angleDeg),
    }));
    const angles = layOutAnglesDeg(
      slots,
      rows.map((r) => Number(r.number)),
    );
    let filled = 0;
    slots.forEach((s, i) => {
      if (s.angleDeg != null) return;
      form.setValue(`positions.${i}.angleDeg`, angles[i], { shouldDirty: true });
      filled++;
    });
    setMessage({
      tone: 'success',
      text: filled === 0 ? 'Every position already has an angle.' : `Angles filled in for ${filled} position(s). Save to keep them.`,
    });
  };

  const fieldError = (i: number, f: keyof FormRow) => errors?.[i]?.[f]?.message;
  /** A row's problems go in a full-width line under it, so the columns stay narrow. */
  const errorsId = (i: number) => `layout-row-${i}-problems`;
  const invalid = (i: number, f: keyof FormRow) => (fieldError(i, f) ? { 'aria-invalid': true, 'aria-describedby': errorsId(i) } : {});
  const input = (
    i: number,
    f: keyof FormRow,
    width: string,
    opts: { mode?: 'numeric' | 'decimal'; optional?: boolean; readOnly?: boolean } = {},
  ) => (
    <td className={`px-1 py-1 align-top ${f === 'number' ? 'sticky left-0 z-10 bg-inherit' : ''}`}>
      <input
        aria-label={`${fieldLabels[f]}, row ${i + 1}`}
        inputMode={opts.mode ?? 'decimal'}
        readOnly={opts.readOnly}
        className={`${cellInput} ${width}`}
        {...invalid(i, f)}
        {...form.register(`positions.${i}.${f}`, opts.optional ? optional : required)}
      />
    </td>
  );

  return (
    <Panel title="Edit the layout">
      <form onSubmit={onSave} noValidate className="space-y-4">
        {message && (
          <Alert tone={message.tone} title={message.text}>
            {message.issues && message.issues.length > 0 && (
              <ul className="list-disc pl-6">
                {message.issues.map((t) => (
                  <li key={t}>{t}</li>
                ))}
              </ul>
            )}
          </Alert>
        )}
        <div className="relative overflow-x-auto rounded-lg border border-basalt-200">
          <table className="min-w-full text-left">
            <thead className="bg-basalt-100 text-caption">
              <tr>
                {['No.', 'Radius (mm)', 'Class', 'Disc (in)', 'Tilt (°)', 'Limit (mm)', 'Twin', 'Angle (°)', ''].map((h, i) => (
                  <th key={i} scope="col" className={`px-1 py-2 font-semibold ${i === 0 ? 'sticky left-0 z-10 bg-basalt-100' : ''}`}>
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {fields.length === 0 && (
                <tr>
                  <td colSpan={9} className="px-3 py-4 text-basalt-600">
                    No positions yet. Import a CSV file above, or add them one by one.
                  </td>
                </tr>
              )}
              {fields.map((field, i) => {
                const problems = (Object.keys(fieldLabels) as (keyof FormRow)[]).flatMap((f) => {
                  const message = fieldError(i, f);
                  return message ? [{ f, message }] : [];
                });
                return (
                  <Fragment key={field.id}>
                    <tr className={`border-t border-basalt-100 ${problems.length ? 'bg-alarm-100' : 'bg-white'}`}>
                      {input(i, 'number', 'w-16', { mode: 'numeric', readOnly: i < savedCount })}
                      {input(i, 'trackRadiusMm', 'w-20')}
                      <td className="px-1 py-1 align-top">
                        <select
                          aria-label={`Class, row ${i + 1}`}
                          className={`${cellInput} w-24`}
                          {...invalid(i, 'positionClass')}
                          {...form.register(`positions.${i}.positionClass`)}
                        >
                          {positionClasses.map((c) => (
                            <option key={c} value={c}>
                              {positionClassLabels[c]}
                            </option>
                          ))}
                        </select>
                      </td>
                      {input(i, 'discSizeIn', 'w-16')}
                      {input(i, 'tiltDeg', 'w-16', { optional: true })}
                      {input(i, 'wearLimitMm', 'w-16')}
                      <td className="px-1 py-1 text-center align-top">
                        <label className="inline-flex min-h-touch min-w-touch items-center justify-center">
                          <span className="sr-only">
                            {fieldLabels.twinDisc}, row {i + 1}
                          </span>
                          <input
                            type="checkbox"
                            className="size-6 accent-ember-600"
                            {...invalid(i, 'twinDisc')}
                            {...form.register(`positions.${i}.twinDisc`)}
                          />
                        </label>
                      </td>
                      {input(i, 'angleDeg', 'w-16', { optional: true })}
                      <td className="px-1 py-1 align-top">
                        {i >= savedCount && (
                          <Button variant="ghost" aria-label={`Remove row ${i + 1}`} title="Remove this new row" onClick={() => remove(i)}>
                            ✕
                          </Button>
                        )}
                      </td>
                    </tr>
                    {problems.length > 0 && (
                      <tr className="bg-alarm-100">
                        <td colSpan={9} id={errorsId(i)} className="px-2 pb-2 text-caption font-semibold text-alarm-700">
                          {problems.map((p) => (
                            <p key={p.f}>
                              {fieldLabels[p.f]}: {p.message}
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
          <Button type="submit" disabled={form.formState.isSubmitting || fields.length === 0}>
            Save layout
          </Button>
          <Button variant="secondary" onClick={() => append(blankRow(form.getValues('positions').at(-1)))}>
            Add a position
          </Button>
          <Button variant="secondary" onClick={layOutEvenly}>
            Lay out angles evenly
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
          Tilt applies to gauge positions; leave it blank elsewhere. Angles are degrees clockwise from the top, seen from the face; blank
          ones are laid out evenly on the picture. A saved position keeps its number and cannot be removed here.
        </p>
      </form>
    </Panel>
  );
}

interface ImportProblem {
  row: string;
  column: string;
  message: string;
}

function CsvImport({ projectId }: { projectId: string }) {
  const importCsv = useImportLayoutCsv(projectId);
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<{ tone: 'success' | 'error'; text: string; problems: ImportProblem[] } | null>(null);

  const onFile = async (e: ChangeEvent<HTMLInputElement>) => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    setBusy(true);
    setResult(null);
    try {
      const saved = await importCsv.mutateAsync(await file.text());
      const notes = (saved.warnings ?? []).map((w) => ({ row: String(w.row), column: w.column, message: w.message }));
      setResult({ tone: 'success', text: `${file.name} imported: ${savedText(saved)}`, problems: notes });
    } catch (err) {
      const problems =
        err instanceof ApiError
          ? err.issues.map((issue) => {
              const m = /^row (\d+)(?:\.(\w+))?/.exec(issue.path);
              const field = m?.[2] as keyof PositionInput | undefined;
              // The reader names the column as the file wrote it; older answers only had the field.
              const written = (issue as { column?: string }).column;
              return { row: m?.[1] ?? '—', column: written || (field ? (csvColumnOf[field] ?? field) : '—'), message: issue.message };
            })
          : [];
      setResult({ tone: 'error', text: err instanceof ApiError ? err.message : 'The import failed. Try again.', problems });
    } finally {
      setBusy(false);
    }
  };

  return (
    <Panel title="Import from CSV">
      <div className="space-y-3">
        <p>
          One row per position with the columns <code className="text-caption">{csvFields.map((f) => csvColumnOf[f]).join(', ')}</code>.
          Every row is checked; if any row has a problem, nothing is imported. Rows with a position number already in the layout update it.
        </p>
        <label className="inline-flex min-h-touch cursor-pointer items-center rounded-md border-2 border-basalt-300 bg-white px-4 font-semibold focus-within:outline-3 focus-within:outline-ember-500">
          {busy ? 'Importing…' : 'Choose a CSV file'}
          <input type="file" accept=".csv,text/csv" className="sr-only" disabled={busy} onChange={onFile} />
        </label>
        {result && (
          <Alert tone={result.tone} title={result.text}>
            {result.problems.length > 0 && (
              <div className="mt-2 text-caption text-basalt-900">
                <DataTable
                  data={result.problems}
                  columns={problemColumns}
                  label="Problems in the file"
                  exportName="kerfwise-layout-import-problems"
                  filterable={result.problems.length > 10}
                />
              </div>
            )}
          </Alert>
        )}
      </div>
    </Panel>
  );
}

const problemCol = createColumnHelper<ImportProblem>();
const problemColumns = [
  problemCol.accessor('row', {
    header: 'Row',
    meta: { csvDecimals: 0 },
    cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span>,
  }),
  problemCol.accessor('column', { header: 'Column' }),
  problemCol.accessor('message', { header: 'Problem' }),
];

const col = createColumnHelper<LayoutPosition>();
const readOnlyColumns = [
  col.accessor('number', { meta: { csvDecimals: 0 }, header: 'Position' }),
  col.accessor('trackRadiusMm', { meta: { csvDecimals: 0 }, header: 'Radius (mm)' }),
  col.accessor((p) => positionClassLabels[p.positionClass], { id: 'class', header: 'Class' }),
  col.accessor('discSizeIn', { meta: { csvDecimals: 0 }, header: 'Disc (in)' }),
  col.accessor('tiltDeg', { meta: { csvDecimals: 1 }, header: 'Tilt (°)', cell: ({ getValue }) => getValue()?.toFixed(1) ?? '—' }),
  col.accessor('wearLimitMm', { meta: { csvDecimals: 1 }, header: 'Limit (mm)' }),
  col.accessor((p) => (p.twinDisc ? 'yes' : 'no'), { id: 'twin', header: 'Twin discs' }),
  col.accessor('angleDeg', { meta: { csvDecimals: 1 }, header: 'Angle (°)', cell: ({ getValue }) => getValue()?.toFixed(1) ?? 'even' }),
];

export function LayoutRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: positions } = useSuspenseQuery(layoutQueries.list(projectId));
  const canEdit = roleCan(project.role, 'layout.edit');
  return (
    <Page
      title="Cutterhead layout"
      actions={
        <Button
          variant="secondary"
          onClick={() => downloadCsv(positions.length ? 'kerfwise-layout.csv' : 'kerfwise-layout-template.csv', layoutCsv(positions))}
        >
          {positions.length ? 'Download layout CSV' : 'Download CSV template'}
        </Button>
      }
    >
      <p className="text-basalt-700">
        Excavated diameter {project.excavatedDiameterM.toFixed(2)} m: track radii up to {(project.excavatedDiameterM * 500).toFixed(0)} mm.
        {canEdit ? '' : ' Only the maintenance planner can change the layout.'}
      </p>
      {canEdit ? (
        <>
          <CsvImport projectId={projectId} />
          <LayoutEditor projectId={projectId} positions={positions} />
        </>
      ) : (
        <DataTable
          data={positions}
          columns={readOnlyColumns}
          exportName="kerfwise-layout"
          emptyText="The planner has not entered the layout yet."
        />
      )}
    </Page>
  );
}
