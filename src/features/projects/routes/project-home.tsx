import { useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { roleLabels } from '../../../../shared/roles';
import { formatChainage } from '../../../../shared/domain/chainage';
import { Alert } from '../../../components/ui/alert';
import { Page, Panel } from '../../../components/ui/page';
import { overviewQueries, projectQueries } from '../api';
import { OverviewPanels } from '../components/overview-panels';

/** The drive's home: the role's start of the day (Overview), then the drive's description. */
export function ProjectHomeRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const overview = useQuery(overviewQueries.detail(projectId));
  return (
    <Page title={project.name}>
      <section aria-label="Start of the day" className="space-y-6">
        {overview.isPending && <p>Loading your overview…</p>}
        {overview.error && (
          <Alert tone="error" title="The overview could not be loaded">
            {overview.error.message}
          </Alert>
        )}
        {overview.data && <OverviewPanels overview={overview.data} projectId={projectId} />}
      </section>
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
