import { useSuspenseQuery } from '@tanstack/react-query';
import { advanceLogRequiredColumns } from '../../../../shared/csv-headers';
import { advanceLogImportUrl, driveDataQueries, type AdvanceLogImported } from '../api';
import { ColumnMappingStep, useColumnMappingChoice } from './column-mapping';
import { CsvUpload } from './csv-upload';

const count = (n: number) => n.toLocaleString('en-GB');

/** The planner's import of the machine's advance log, with the column mapping as an optional step. */
export function AdvanceLogImport({ projectId, onImported }: { projectId: string; onImported: () => void }) {
  const { data: known } = useSuspenseQuery(driveDataQueries.mapping(projectId));
  const { headers, choice, setChoice, onFile, mappingParam } = useColumnMappingChoice(known);
  const url = (replace: boolean) => {
    const params = new URLSearchParams({ replace: String(replace) });
    if (mappingParam) params.set('mapping', mappingParam);
    return `${advanceLogImportUrl(projectId)}?${params}`;
  };

  return (
    <CsvUpload<AdvanceLogImported>
      title="Import the advance log"
      url={url}
      onFile={onFile}
      step={
        headers &&
        headers.length > 1 && (
          <ColumnMappingStep
            headers={headers}
            fields={known.fields}
            required={advanceLogRequiredColumns}
            stored={known.mapping}
            choice={choice}
            onChange={setChoice}
            unusedNote="are kept with each ring as extra data"
          />
        )
      }
      successTitle={(name, body) =>
        `${name} imported: ${count(body.inserted)} new, ${count(body.unchanged)} already stored and unchanged, ${count(body.replaced)} replaced.`
      }
      replaceLabel="Replace these rings"
      onImported={onImported}
    >
      <p>
        The CSV file from the machine’s data system: one row per ring or stroke with its number, start and end time, chainage at start and
        end, and cutterhead revolutions or penetration; speed, thrust and torque when logged. Comma, semicolon or tab between columns and
        decimal commas are recognised. Times without a UTC offset are read in the site’s time zone.
      </p>
      <p>Rings already stored with the same values are skipped, so importing a file twice adds nothing.</p>
    </CsvUpload>
  );
}
