import { useSuspenseQuery } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { roleLabels } from '../../../../shared/roles';
import { formatChainage } from '../../../../shared/domain/chainage';
import { Page, Panel } from '../../../components/ui/page';
import { projectQueries } from '../api';

export function ProjectHomeRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  return (
    <Page title={project.name}>
      <Panel title="The drive">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Machine</dt>
          <dd>{project.machineDescription || '—'}</dd>
          <dt className="font-semibold">Excavated diameter</dt>
          <dd>{project.excavatedDiameterM.toFixed(2)} m</dd>
          <dt className="font-semibold">Start chainage</dt>
          <dd>{formatChainage(project.startChainageM)}</dd>
          <dt className="font-semibold">Chainage as the machine advances</dt>
          <dd>{project.driveDirection === 'increasing' ? 'increases' : 'decreases'}</dd>
          <dt className="font-semibold">Site time zone</dt>
          <dd>{project.siteTimeZone}</dd>
          <dt className="font-semibold">Your role</dt>
          <dd>{roleLabels[project.role]}</dd>
        </dl>
      </Panel>
    </Page>
  );
}
