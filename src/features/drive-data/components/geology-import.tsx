import { useSuspenseQuery } from '@tanstack/react-query';
import { geologySectionRequiredColumns } from '../../../../shared/csv-headers';
import { driveDataQueries, geologyImportUrl, type GeologyImported } from '../api';
import { ColumnMappingStep, useColumnMappingChoice } from './column-mapping';
import { CsvUpload } from './csv-upload';

/** The planner's import of the geology long section, with the column mapping as an optional step (as for the advance log). */
export function GeologyImport({ projectId, onImported }: { projectId: string; onImported: () => void }) {
  const { data: known } = useSuspenseQuery(driveDataQueries.geologyMapping(projectId));
  const { headers, choice, setChoice, onFile, mappingParam } = useColumnMappingChoice(known);
  const url = () =>
    mappingParam ? `${geologyImportUrl(projectId)}?${new URLSearchParams({ mapping: mappingParam })}` : geologyImportUrl(projectId);

  return (
    <CsvUpload<GeologyImported>
      title="Import the long section"
      url={url}
      onFile={onFile}
      step={
        headers &&
        headers.length > 1 && (
          <ColumnMappingStep
            headers={headers}
            fields={known.fields}
            required={geologySectionRequiredColumns}
            stored={known.mapping}
            choice={choice}
            onChange={setChoice}
            unusedNote="are not imported; each is named in a note after the import"
          />
        )
      }
      successTitle={(name, body) => `${name} imported: ${body.saved} sections saved; they replace the long section stored before.`}
      onImported={onImported}
    >
      <p>
        One row per section with the columns chainage from, chainage to (m, lower chainage first), ground type (by name; new names become
        new ground types), water head above the axis (m), stop allowed (yes/no) and stop reason (needed where no stop is allowed); UCS (MPa)
        and CAI of the ground type when known. Names with units joined by a space or an underscore (water_head_m) are recognised.
      </p>
      <p>
        The file replaces the whole long section. Overlapping sections are refused; gaps, empty water heads and columns not read are
        reported.
      </p>
    </CsvUpload>
  );
}
