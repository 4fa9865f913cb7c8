import { useQuery, useQueryClient, useSuspenseQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { paths } from '../../../config/paths';
import { projectQueries } from '../../projects/api';
import { roundQueries, type RoundDetail, type RoundEntry } from '../api';
import { closeRoundOnDevice } from '../offline-round';
import { CutterheadCaution } from '../../../components/ui/cutterhead-caution';
import { draftFrom, EntryForm, type Draft } from '../components/entry-form';
import { useOvertaken } from '../overtaken';
import { Legend } from '../components/marks';
import { AttentionList, SaveStatus } from '../components/outbox-status';
import { positionMark, PositionStrip } from '../components/position-strip';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { useOutbox, type QueuedEntry, type QueuedItem } from '../../../lib/outbox';

/** Puts what the server just stored into the cached round, so the screen shows it before the refetch. */
function withStored(detail: RoundDetail, item: QueuedItem, answer: unknown): RoundDetail {
  if (item.kind === 'entry') {
    const { entry, overLimit, needsChange } = answer as {
      entry: Omit<RoundEntry, 'overLimit' | 'needsChange' | 'photoIds'>;
      overLimit: boolean;
      needsChange: boolean;
    };
    const before = detail.entries.find((e) => e.positionId === entry.positionId);
    const updated: RoundEntry = { ...entry, overLimit, needsChange, photoIds: before?.photoIds ?? [] };
    return { ...detail, entries: [...detail.entries.filter((e) => e.positionId !== entry.positionId), updated] };
  }
  const photo = answer as { id: string; entryId: string };
  return {
    ...detail,
    entries: detail.entries.map((e) =>
      e.id === photo.entryId && !e.photoIds.includes(photo.id) ? { ...e, photoIds: [...e.photoIds, photo.id] } : e,
    ),
  };
}

type Order = 'number' | 'last';

/** The round screen: one position at a time, for a tablet at the face. */
export function RoundRoute() {
  const { projectId = '', roundId = '' } = useParams();
  const queryClient = useQueryClient();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const detailQuery = roundQueries.detail(projectId, roundId);
  const { data } = useSuspenseQuery(detailQuery);
  // Loaded on arrival, so the store list is at hand when the network goes.
  const { data: storeCutters = [] } = useQuery(roundQueries.inStore(projectId));
  const outbox = useOutbox((item, answer) => {
    if (item.projectId !== projectId) return;
    if (item.roundId === roundId) queryClient.setQueryData(detailQuery.queryKey, (old) => old && withStored(old, item, answer));
    void queryClient.invalidateQueries({ queryKey: roundQueries.all(projectId) });
    if (item.kind === 'entry' && item.body.action === 'changed')
      void queryClient.invalidateQueries({ queryKey: roundQueries.inStore(projectId).queryKey });
  });
  const overtaken = useOvertaken(projectId);
  const [order, setOrder] = useState<Order>('number');
  const [grid, setGrid] = useState(false);
  const [params, setParams] = useSearchParams();
  const [drafts, setDrafts] = useState<Record<string, Draft>>({});
  const [closeError, setCloseError] = useState<string | null>(null);
  // The Save bar is fixed at the bottom: whatever is scrolled or focused into view stops above it.
  useEffect(() => {
    const html = document.documentElement;
    html.style.scrollPaddingBottom = '15rem';
    return () => void (html.style.scrollPaddingBottom = '');
  }, []);

  const { round, positions, entries, lastRoundOrder } = data;
  const tz = project.siteTimeZone;
  const readOnly = !roleCan(project.role, 'rounds.record') || round.closedAt != null;

  const ordered = useMemo(() => {
    if (order === 'number') return positions;
    const rank = new Map(lastRoundOrder.map((id, i) => [id, i]));
    return [...positions].sort((a, b) => (rank.get(a.id) ?? Infinity) - (rank.get(b.id) ?? Infinity) || a.number - b.number);
  }, [order, positions, lastRoundOrder]);

  const roundItems = outbox.items.filter((i) => i.roundId === roundId);
  const queuedByPosition = new Map<string, QueuedEntry>();
  for (const i of roundItems) if (i.kind === 'entry') queuedByPosition.set(i.positionId, i); // in queue order: the newest wins
  const storedByPosition = new Map(entries.map((e) => [e.positionId, e]));
  // The caller's entries overtaken in this round (newest first): who overtook each position's.
  const overtakenBy = new Map<string, string>();
  for (const o of overtaken.all)
    if (o.roundId === roundId && !overtakenBy.has(o.positionId)) overtakenBy.set(o.positionId, o.byName ?? 'another user');
  const marks = new Map(
    positions.map((p) => [
      p.id,
      positionMark(p, storedByPosition.get(p.id), queuedByPosition.get(p.id), p.id in drafts, overtakenBy.get(p.id) ?? null),
    ]),
  );

  if (positions.length === 0) {
    return (
      <section className="mx-auto max-w-6xl space-y-4 p-4">
        <h1>Inspection round</h1>
        <Alert tone="caution">This drive has no cutterhead layout yet. The planner enters the positions first (Layout).</Alert>
      </section>
    );
  }

  const index = Math.max(
    0,
    ordered.findIndex((p) => String(p.number) === params.get('p')),
  );
  const position = ordered[index];
  const overtakenHere = overtaken.all.find((o) => o.roundId === roundId && o.positionId === position.id);
  const prev = ordered[index - 1];
  const next = ordered[index + 1];
  const goTo = (positionId: string) => {
    const target = positions.find((p) => p.id === positionId);
    if (target) setParams({ p: String(target.number) }, { replace: true });
  };

  const all = [...marks.values()];
  const done = all.filter((m) => m.state === 'saved' || m.state === 'waiting').length;
  const waiting = all.filter((m) => m.state === 'waiting').length;
  const over = all.filter((m) => m.overLimit).length;
  const change = all.filter((m) => m.needsChange).length;

  const onClose = async () => {
    setCloseError(null);
    if (!window.confirm('Close this round? No more positions can be recorded in it.')) return;
    // Through the outbox: sent after every entry and photo of the round, with or without network.
    try {
      await closeRoundOnDevice(queryClient, projectId, roundId);
    } catch {
      setCloseError('The round could not be closed on this device. Try again.');
    }
  };

  return (
    <section className="mx-auto max-w-6xl space-y-3 p-3 pb-48 md:px-6 md:pb-48">
      <div className="flex flex-wrap items-center justify-between gap-x-4 gap-y-2">
        <div>
          <h1 className="text-lead font-bold md:text-title">
            <Link to={paths.rounds(projectId)} className="inline-flex min-h-touch min-w-touch items-center font-semibold underline">
              Rounds
            </Link>
            <span aria-hidden="true"> › </span>
            {formatSiteDateTime(round.startedAt, tz)}
          </h1>
          <p className="text-basalt-700">
            Chainage {formatChainage(round.chainageM)}
            {round.ringNumber != null && ` · ring ${round.ringNumber}`}
            {round.crew && ` · ${round.crew}`}
            {' · '}
            <strong>{round.closedAt ? 'closed' : 'open'}</strong>
          </p>
        </div>
        <div role="group" aria-label="Walking order" className="flex gap-2">
          {(
            [
              ['number', 'By number'],
              ['last', 'As last round'],
            ] as const
          ).map(([value, label]) => (
            <button
              key={value}
              type="button"
              aria-pressed={order === value}
              disabled={value === 'last' && lastRoundOrder.length === 0}
              title={value === 'last' && lastRoundOrder.length === 0 ? 'No earlier round to follow.' : undefined}
              onClick={() => setOrder(value)}
              className={`min-h-touch rounded-md border-2 px-3 font-semibold disabled:border-basalt-200 disabled:text-basalt-400 ${order === value ? 'border-basalt-900 bg-basalt-900 text-white' : 'border-basalt-400 bg-white text-basalt-900'}`}
            >
              {label}
            </button>
          ))}
        </div>
      </div>

      <div className="rounded-lg border-2 border-basalt-300 bg-white px-2 py-2">
        <div className="flex flex-wrap items-center justify-between gap-2 px-1">
          <p className="font-semibold" aria-live="polite">
            {done} of {positions.length} done{waiting > 0 && ` (${waiting} waiting to be sent)`} · {over} over limit · {change} need
            {change === 1 ? 's' : ''} a change
          </p>
          <button
            type="button"
            aria-expanded={grid}
            aria-controls="position-strip"
            onClick={() => setGrid((g) => !g)}
            className="min-h-touch rounded-md border-2 border-basalt-400 px-3 font-semibold"
          >
            {grid ? 'One row' : 'Show all'}
          </button>
        </div>
        <PositionStrip positions={ordered} marks={marks} currentId={position.id} onPick={goTo} grid={grid} />
        <div className="hidden md:block">
          <Legend />
        </div>
        <details className="md:hidden">
          <summary className="flex min-h-touch cursor-pointer items-center font-semibold">What the marks mean</summary>
          <Legend />
        </details>
      </div>

      <CutterheadCaution />

      {/* The current position's own refusal is shown in its form. */}
      <AttentionList
        items={roundItems.filter((i) => i.kind !== 'entry' || i.positionId !== position.id)}
        positionNumber={(id) => positions.find((p) => p.id === id)?.number}
        onOpen={goTo}
      />
      {readOnly && (
        <Alert tone="info">
          {round.closedAt
            ? 'This round is closed; what was recorded is shown.'
            : 'You can look at this round; recording is for fitters and planners.'}
        </Alert>
      )}

      {overtakenHere && (
        <Alert tone="info">
          {`Your entry for position ${position.number} was overtaken by ${overtakenHere.byName ?? 'another user'} at ${formatSiteDateTime(overtakenHere.at, tz)}: their later-recorded entry stands; yours is kept in the audit trail.`}
        </Alert>
      )}

      <EntryForm
        key={position.id}
        projectId={projectId}
        roundId={roundId}
        timeZone={tz}
        position={position}
        stored={storedByPosition.get(position.id)}
        queued={queuedByPosition.get(position.id)}
        waitingPhotos={roundItems.filter((i) => i.kind === 'photo' && i.positionId === position.id).length}
        storeCutters={storeCutters.filter((c) => ![...queuedByPosition.values()].some((q) => q.body.fitted?.serial === c.serial))}
        draft={drafts[position.id] ?? draftFrom(position, storedByPosition.get(position.id), queuedByPosition.get(position.id))}
        edited={position.id in drafts}
        onDraft={(d) => setDrafts((all) => ({ ...all, [position.id]: d }))}
        readOnly={readOnly}
        onSaved={(refused) => {
          setDrafts(({ [position.id]: _saved, ...rest }) => rest);
          if (!refused && next) goTo(next.id);
        }}
        onPrev={prev ? () => goTo(prev.id) : null}
        onNext={next ? () => goTo(next.id) : null}
        prevNumber={prev?.number}
        nextNumber={next?.number}
        status={<SaveStatus items={roundItems} sending={outbox.sending} />}
      />

      {!readOnly && (
        <div className="space-y-2 border-t-2 border-basalt-200 pt-4">
          {closeError && <Alert tone="error">{closeError}</Alert>}
          <Button variant="secondary" onClick={onClose} disabled={roundItems.some((i) => i.state === 'attention')}>
            Close the round
          </Button>
          {roundItems.some((i) => i.state === 'attention') && (
            <p className="text-caption text-basalt-700">
              The round can be closed once the entries that need attention are fixed or discarded.
            </p>
          )}
        </div>
      )}
    </section>
  );
}
