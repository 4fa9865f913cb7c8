import { useSuspenseQueries } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { Page, Panel } from '../../../components/ui/page';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate, formatSiteDateTime } from '../../../../shared/site-time';
import { geologyQueries } from '../../../lib/geology-queries';
import { projectQueries } from '../../projects/api';
import { forecastQueries } from '../api';
import { ForecastChart } from '../components/forecast-chart';
import { ForecastTable } from '../components/forecast-table';
import { SettingsPanel } from '../components/settings-panel';
import { fixed } from '../format';

const linkClass = 'flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2';

/** Where and when each cutterhead position reaches its wear limit, walking the geology ahead of the machine. */
export function ForecastRoute() {
  const { projectId = '' } = useParams();
  const [{ data: project }, { data: forecast }, { data: geology }, { data: groundTypes }, { data: settings }] = useSuspenseQueries({
    queries: [
      projectQueries.detail(projectId),
      forecastQueries.forecast(projectId),
      geologyQueries.geology(projectId),
      geologyQueries.groundTypes(projectId),
      forecastQueries.settings(projectId),
    ],
  });
  const tz = project.siteTimeZone;
  const names = new Map(groundTypes.map((g) => [g.id, g.name]));
  const groundName = (id: string | null) => (id == null ? 'Unknown ground' : (names.get(id) ?? 'Unknown ground type'));
  const next = forecast.positions[0];
  const overLimit = forecast.positions.filter((p) => p.p90.status === 'over_limit').length;
  const boreLoss = forecast.positions.filter((p) => p.gaugeBore?.exceedsOvercut).length;

  return (
    <Page
      title="Change-out forecast"
      actions={
        <Link className={linkClass} to="../wear-fits" relative="path">
          Wear rates by ground
        </Link>
      }
    >
      <p className="max-w-prose">
        {forecast.currentChainageM == null
          ? 'The machine’s position is not known yet.'
          : `Machine at ${formatChainage(forecast.currentChainageM)}, ring ${forecast.currentRingNumber}.`}{' '}
        Worked out {formatSiteDateTime(forecast.now, tz)} (site time) from every inspection and stroke recorded so far. P50 is the central
        estimate; P90 the cautious one: nine discs in ten should last at least that far.
      </p>

      {forecast.problems.map((problem) => (
        <Alert key={problem} tone="caution" title={problem} />
      ))}
      {geology.warnings.length > 0 && (
        <Alert tone="caution" title="The long section has gaps.">
          Unknown ground {geology.warnings.map((w) => `${formatChainage(w.fromM)} to ${formatChainage(w.toM)}`).join(', ')}: the forecast
          takes the most cautious known values there.
        </Alert>
      )}
      {next && (
        <Alert
          tone={overLimit > 0 ? 'error' : 'info'}
          title={
            overLimit > 0 ? `${overLimit} position${overLimit === 1 ? ' is' : 's are'} at or over the wear limit (P90).` : 'Next change-out'
          }
        >
          {next.p90.status === 'over_limit'
            ? `Position ${next.position.positionNumber} is due now: ${fixed(next.p90.wearNowMm)} mm worn (P90) against a ${next.position.allowableWearMm} mm limit.`
            : `Position ${next.position.positionNumber} reaches its limit by ${formatChainage(next.p90.chainageM)} (cautious), ring ${next.p90.ringNumber}, on ${formatSiteDate(next.p90.date, tz)}: ${fixed(next.p90.remainingM, 0)} m ahead.`}
          {boreLoss > 0 &&
            ` ${boreLoss} gauge position${boreLoss === 1 ? '' : 's'} would cut the bore smaller than the overcut allows before change-out.`}
        </Alert>
      )}

      <Panel title="Along the drive">
        <ForecastChart forecast={forecast} geology={geology} groundTypes={groundTypes} driveDirection={project.driveDirection} />
      </Panel>

      <Panel title="By position, most urgent first">
        <ForecastTable projectId={projectId} positions={forecast.positions} timeZone={tz} groundName={groundName} />
      </Panel>

      <SettingsPanel
        projectId={projectId}
        settings={settings}
        groundTypes={groundTypes}
        driveRates={forecast.driveRates}
        canEdit={roleCan(project.role, 'forecast.edit')}
      />
    </Page>
  );
}
