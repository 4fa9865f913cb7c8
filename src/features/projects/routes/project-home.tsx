import { useSuspenseQuery } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { roleLabels } from '../../../../shared/roles';
import { Page, Panel } from '../../../components/ui/page';
import { projectQueries } from '../api';

const chainage = (m: number) => {
  const km = Math.floor(Math.abs(m) / 1000);
  const rest = (Math.abs(m) - km * 1000).toFixed(1).padStart(5, '0');
  return `${m < 0 ? '-' : ''}${km}+${rest}`;
};

export function ProjectHomeRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  return (
    <Page title={project.name}>
      <Panel title="The drive">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Machine</dt><dd>{project.machineDescription || '—'}</dd>
          <dt className="font-semibold">Excavated diameter</dt><dd>{project.excavatedDiameterM.toFixed(2)} m</dd>
          <dt className="font-semibold">Start chainage</dt><dd>{chainage(project.startChainageM)}</dd>
          <dt className="font-semibold">Chainage as the machine advances</dt><dd>{project.driveDirection === 'increasing' ? 'increases' : 'decreases'}</dd>
          <dt className="font-semibold">Site time zone</dt><dd>{project.siteTimeZone}</dd>
          <dt className="font-semibold">Your role</dt><dd>{roleLabels[project.role]}</dd>
        </dl>
      </Panel>
    </Page>
  );
}
