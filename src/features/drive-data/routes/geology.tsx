import { useQueryClient, useSuspenseQueries } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { Page, Panel } from '../../../components/ui/page';
import { formatChainage } from '../../../../shared/domain/chainage';
import { geologyQueries } from '../../../lib/geology-queries';
import { projectQueries } from '../../projects/api';
import { driveDataQueries, type GeologySection } from '../api';
import { GeologyImport } from '../components/geology-import';
import { GroundTypesPanel } from '../components/ground-types-panel';
import { gapText, LongSectionEditor } from '../components/long-section-editor';
import { LongSectionStrip } from '../components/long-section-strip';

const col = createColumnHelper<GeologySection>();

/** Ground types, the long section along chainage, and where the machine is in it. */
export function GeologyRoute() {
  const { projectId = '' } = useParams();
  const queryClient = useQueryClient();
  const [{ data: project }, { data: geology }, { data: groundTypes }] = useSuspenseQueries({
    queries: [projectQueries.detail(projectId), geologyQueries.geology(projectId), geologyQueries.groundTypes(projectId)],
  });
  const canEdit = roleCan(project.role, 'drive.edit');
  const groundName = new Map(groundTypes.map((g) => [g.id, g.name]));
  const refresh = () => queryClient.invalidateQueries({ queryKey: driveDataQueries.all(projectId) });

  const readOnlyColumns = [
    col.accessor('chainageFromM', { meta: { csvDecimals: 1 }, header: 'From', cell: ({ getValue }) => formatChainage(getValue()) }),
    col.accessor('chainageToM', { meta: { csvDecimals: 1 }, header: 'To', cell: ({ getValue }) => formatChainage(getValue()) }),
    col.accessor((s) => groundName.get(s.groundTypeId) ?? '—', { id: 'ground', header: 'Ground type' }),
    col.accessor('waterHeadM', { meta: { csvDecimals: 1 }, header: 'Water head (m)' }),
    col.accessor((s) => (s.stopAllowed ? 'yes' : 'no'), { id: 'stop', header: 'Stop allowed' }),
    col.accessor('stopReason', { header: 'Stop reason' }),
  ];

  return (
    <Page title="Geology">
      <p className="max-w-prose text-basalt-700">
        {geology.currentChainageM == null
          ? 'The machine’s position is not known until the advance log is imported.'
          : `Machine at ${formatChainage(geology.currentChainageM)} (end of the last stroke logged).`}{' '}
        Chainage {project.driveDirection === 'increasing' ? 'increases' : 'decreases'} as the machine advances.
      </p>

      {geology.warnings.length > 0 && (
        <Alert tone="caution" title="The long section has gaps.">
          Unknown ground {gapText(geology.warnings)}: the forecast takes the most cautious known values there.
        </Alert>
      )}

      <Panel title="Long section">
        <LongSectionStrip geology={geology} groundTypes={groundTypes} driveDirection={project.driveDirection} />
      </Panel>

      <GroundTypesPanel projectId={projectId} groundTypes={groundTypes} canEdit={canEdit} />

      {canEdit ? (
        <>
          <LongSectionEditor projectId={projectId} sections={geology.sections} groundTypes={groundTypes} />
          <GeologyImport projectId={projectId} onImported={refresh} />
        </>
      ) : (
        <Panel title="Sections">
          <DataTable
            data={geology.sections}
            columns={readOnlyColumns}
            exportName="kerfwise-long-section"
            emptyText="The planner has not entered the long section yet."
          />
        </Panel>
      )}
    </Page>
  );
}
