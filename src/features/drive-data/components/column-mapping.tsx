import Papa from 'papaparse';
import { useId, useState } from 'react';
import { missingColumnGroups, proposeMapping, type ColumnMapping, type CsvFieldInfo } from '../../../../shared/csv-headers';

/** The column names on the first line of a file, read in the browser (the file is not sent for this). */
export async function readHeader(file: File): Promise<string[]> {
  const text = (await file.slice(0, 64 * 1024).text()).replace(/^\uFEFF/, '');
  const parsed = Papa.parse<string[]>(text, { preview: 1, delimitersToGuess: [',', ';', '\t'] });
  return (parsed.data[0] ?? []).map((h) => h.trim()).filter((h) => h !== '');
}

/**
 * The mapping step's state for one import: the chosen file's header, read in the browser, and the
 * column chosen for each field (proposed from the header and the mapping remembered on the server).
 * `mappingParam` is what the upload URL carries once the header is read: the choice on screen is
 * what the server uses, so a mapping remembered from a file with other column names does not apply.
 */
export function useColumnMappingChoice<F extends string>(known: { fields: CsvFieldInfo<F>[]; mapping: ColumnMapping<F> | null }) {
  const [headers, setHeaders] = useState<string[] | null>(null);
  const [choice, setChoice] = useState<ColumnMapping<F>>({});
  const onFile = async (file: File | null) => {
    setHeaders(null);
    if (!file) return;
    const read = await readHeader(file);
    setHeaders(read);
    setChoice(proposeMapping(read, known.fields, known.mapping));
  };
  const mappingParam = headers ? JSON.stringify(choice) : null;
  return { headers, choice, setChoice, onFile, mappingParam };
}

/** Required fields no column was chosen for, in words ("End time", "Cutterhead revolutions or Penetration (mm/rev)"). */
function missingFields<F extends string>(
  choice: ColumnMapping<F>,
  fields: readonly CsvFieldInfo<F>[],
  required: readonly (readonly F[])[],
): string[] {
  const label = (f: F) => fields.find((i) => i.field === f)?.label ?? f;
  return missingColumnGroups(choice, required).map((group) => group.map(label).join(' or '));
}

/**
 * Which column of the chosen file fills each field of an import (advance log, long section).
 * Folded away when every needed field was found; open when one is missing. Header names are
 * proposed by shared/csv-headers.ts, as the server's reader matches them.
 */
export function ColumnMappingStep<F extends string>({
  headers,
  fields,
  required,
  stored,
  choice,
  onChange,
  unusedNote,
}: {
  headers: string[];
  fields: readonly CsvFieldInfo<F>[];
  required: readonly (readonly F[])[];
  stored: ColumnMapping<F> | null;
  choice: ColumnMapping<F>;
  onChange: (choice: ColumnMapping<F>) => void;
  /** What happens to columns not chosen, e.g. "are kept with each ring as extra data". */
  unusedNote: string;
}) {
  const id = useId();
  const requiredAlone = new Set<F>(required.filter((g) => g.length === 1).map((g) => g[0]));
  const missing = missingFields(choice, fields, required);
  const found = fields.filter((f) => choice[f.field]).length;
  const chosen = Object.values(choice).filter(Boolean);
  const twice = [...new Set(chosen.filter((h, i) => chosen.indexOf(h) !== i))];
  return (
    <details open={missing.length > 0} className="rounded-md border border-basalt-200 bg-basalt-50">
      <summary className="flex min-h-touch cursor-pointer items-center px-3 font-semibold">
        Columns: {found} of {fields.length} fields found in the first line of the file
        {missing.length > 0 ? ` — ${missing.length} needed field${missing.length === 1 ? '' : 's'} missing` : ''}. Check or change
      </summary>
      <div className="space-y-3 px-3 pb-3">
        <p className="text-caption text-basalt-700">
          Choose, for each field, the column of your file that holds it. Kerfwise remembers the choice for the next import of this drive.
          Columns not chosen {unusedNote}.
        </p>
        {missing.length > 0 && (
          <p role="status" className="font-semibold text-caution-700">
            Choose a column for {missing.join('; ')}: the file cannot be imported without it.
          </p>
        )}
        {twice.length > 0 && (
          <p role="status" className="font-semibold text-caution-700">
            Chosen for two fields: {twice.map((h) => `‘${h}’`).join(', ')}.
          </p>
        )}
        <div className="overflow-x-auto">
          <table className="min-w-full text-left">
            <thead className="bg-basalt-100 text-caption">
              <tr>
                <th scope="col" className="px-2 py-2">
                  Field
                </th>
                <th scope="col" className="px-2 py-2">
                  Column of this file
                </th>
                <th scope="col" className="px-2 py-2">
                  Last import
                </th>
              </tr>
            </thead>
            <tbody>
              {fields.map((f) => (
                <tr key={f.field} className="border-t border-basalt-200">
                  <td className="px-2 py-1">
                    <label htmlFor={`${id}-${f.field}`} className="font-semibold">
                      {f.label}
                    </label>
                    {requiredAlone.has(f.field) && <span className="ml-2 text-caption text-basalt-600">needed</span>}
                  </td>
                  <td className="px-2 py-1">
                    <select
                      id={`${id}-${f.field}`}
                      className="block min-h-touch w-full min-w-48 rounded-md border-2 border-basalt-300 bg-white px-2"
                      value={choice[f.field] ?? ''}
                      onChange={(e) => onChange({ ...choice, [f.field]: e.target.value || undefined })}
                    >
                      <option value="">Not in this file</option>
                      {headers.map((h) => (
                        <option key={h} value={h}>
                          {h}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td className="px-2 py-1 text-caption text-basalt-600">{stored?.[f.field] ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </div>
    </details>
  );
}
