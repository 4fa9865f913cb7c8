import { useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { useParams, useSearchParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { SelectField } from '../../../components/ui/field';
import { Page } from '../../../components/ui/page';
import { projectQueries } from '../../projects/api';
import { demandFiltersFrom, demandHorizons, partQueries, type DemandFilters } from '../api';
import { CatalogueEditor } from '../components/catalogue-editor';
import { NewOrder, OrderList } from '../components/orders';
import { StockChart } from '../components/stock-chart';
import { StockCount } from '../components/stock-count';
import { PartsStockTable, SuggestionsTable } from '../components/stock-tables';
import { WorkshopSettings } from '../components/workshop-settings';

const tabs = [
  { key: 'stock', label: 'Stock and suggestions' },
  { key: 'orders', label: 'Orders and receiving' },
  { key: 'catalogue', label: 'Catalogue' },
  { key: 'workshop', label: 'Workshop loop' },
] as const;
type Tab = (typeof tabs)[number]['key'];
const serviceLevels = [0.9, 0.95, 0.975, 0.99];

function Problems({ problems }: { problems: string[] }) {
  if (problems.length === 0) return null;
  return (
    <Alert tone="caution" title="What the demand does not include">
      <ul className="list-disc pl-5">
        {problems.map((p) => (
          <li key={p}>{p}</li>
        ))}
      </ul>
    </Alert>
  );
}

function StockTab({
  projectId,
  canEdit,
  filters,
  setFilter,
}: {
  projectId: string;
  canEdit: boolean;
  filters: DemandFilters;
  setFilter: (name: string, value: string) => void;
}) {
  const demand = useQuery(partQueries.demand(projectId, filters));
  const [partId, setPartId] = useState('');
  if (demand.error) return <Alert tone="error">{demand.error.message}</Alert>;
  if (demand.isPending) return <p>Working out the demand…</p>;
  const d = demand.data;
  const showPart = (id: string) => {
    setPartId(id);
    document.getElementById('projected-stock')?.scrollIntoView({ behavior: 'smooth', block: 'start' });
  };
  return (
    <div className="space-y-6">
      <div className="grid max-w-xl gap-4 sm:grid-cols-2">
        <SelectField label="Weeks ahead" value={filters.weeks} onChange={(e) => setFilter('weeks', e.target.value)}>
          {demandHorizons.map((w) => (
            <option key={w} value={w}>
              {w} weeks
            </option>
          ))}
        </SelectField>
        <SelectField label="Service level" value={d.serviceLevel} onChange={(e) => setFilter('serviceLevel', e.target.value)}>
          {[...new Set([...serviceLevels, d.serviceLevel])].sort().map((l) => (
            <option key={l} value={l}>
              {(l * 100).toFixed(1)} %
            </option>
          ))}
        </SelectField>
      </div>
      <Problems problems={d.problems} />
      <PartsStockTable demand={d} onShow={showPart} />
      <div id="projected-stock">
        <StockChart demand={d} partId={partId} onPartChange={setPartId} />
      </div>
      <SuggestionsTable demand={d} />
      {canEdit && <StockCount projectId={projectId} parts={d.parts} />}
    </div>
  );
}

function OrdersTab({ projectId, canEdit, timeZone }: { projectId: string; canEdit: boolean; timeZone: string }) {
  const orders = useQuery(partQueries.orders(projectId));
  const demand = useQuery({ ...partQueries.demand(projectId, { weeks: 12 }), enabled: canEdit });
  if (orders.error) return <Alert tone="error">{orders.error.message}</Alert>;
  if (orders.isPending) return <p>Loading…</p>;
  return (
    <div className="space-y-6">
      <OrderList projectId={projectId} orders={orders.data} canEdit={canEdit} timeZone={timeZone} />
      {canEdit && demand.data && (
        <NewOrder projectId={projectId} parts={demand.data.parts} suggestions={demand.data.suggestions} today={demand.data.startDate} />
      )}
    </div>
  );
}

function CatalogueTab({ projectId, canEdit }: { projectId: string; canEdit: boolean }) {
  const list = useQuery(partQueries.list(projectId));
  if (list.error) return <Alert tone="error">{list.error.message}</Alert>;
  if (list.isPending) return <p>Loading…</p>;
  return <CatalogueEditor projectId={projectId} parts={list.data.parts} canEdit={canEdit} />;
}

function WorkshopTab({ projectId, canEdit }: { projectId: string; canEdit: boolean }) {
  const settings = useQuery(partQueries.workshop(projectId));
  const list = useQuery(partQueries.list(projectId));
  const error = settings.error ?? list.error;
  if (error) return <Alert tone="error">{error.message}</Alert>;
  if (!settings.data || !list.data) return <p>Loading…</p>;
  // Keyed by the saved settings, so the form starts again from what the server holds after a save.
  return (
    <WorkshopSettings
      key={JSON.stringify(settings.data)}
      projectId={projectId}
      settings={settings.data}
      parts={list.data.parts}
      canEdit={canEdit}
    />
  );
}

/** The buyer's page: stock and order suggestions, orders and receiving, the catalogue and the workshop loop. */
export function PartsRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const [params, setParams] = useSearchParams();
  const tab: Tab = tabs.find((t) => t.key === params.get('tab'))?.key ?? 'stock';
  const canEdit = roleCan(project.role, 'parts.edit');
  const filters = demandFiltersFrom(params);
  const setParam = (name: string, value: string) =>
    setParams(
      (prev) => {
        const next = new URLSearchParams(prev);
        next.set(name, value);
        return next;
      },
      { replace: true },
    );

  return (
    <Page title="Parts">
      <div role="tablist" aria-label="Parts" className="flex flex-wrap gap-2 border-b border-basalt-200 pb-2">
        {tabs.map((t) => (
          <button
            key={t.key}
            type="button"
            role="tab"
            aria-selected={tab === t.key}
            onClick={() => setParam('tab', t.key)}
            className={`min-h-touch rounded-md px-4 font-semibold ${tab === t.key ? 'bg-basalt-900 text-white' : 'bg-white text-basalt-800 hover:bg-basalt-100'}`}
          >
            {t.label}
          </button>
        ))}
      </div>
      <div role="tabpanel" aria-label={tabs.find((t) => t.key === tab)!.label}>
        {tab === 'stock' && <StockTab projectId={projectId} canEdit={canEdit} filters={filters} setFilter={setParam} />}
        {tab === 'orders' && <OrdersTab projectId={projectId} canEdit={canEdit} timeZone={project.siteTimeZone} />}
        {tab === 'catalogue' && <CatalogueTab projectId={projectId} canEdit={canEdit} />}
        {tab === 'workshop' && <WorkshopTab projectId={projectId} canEdit={canEdit} />}
      </div>
    </Page>
  );
}
