import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { Link } from 'react-router';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { paths } from '../../../config/paths';
import { roundQueries } from '../api';
import { discardItem, retryItem, useOutbox, type QueuedItem } from '../../../lib/outbox';
import { DoneMark, RefusedMark, WaitingMark } from './marks';

function useOnline() {
  const [online, setOnline] = useState(() => navigator.onLine);
  useEffect(() => {
    const on = () => setOnline(true);
    const off = () => setOnline(false);
    window.addEventListener('online', on);
    window.addEventListener('offline', off);
    return () => {
      window.removeEventListener('online', on);
      window.removeEventListener('offline', off);
    };
  }, []);
  return online;
}

/** "Saved", "Sending (N)…" or "Waiting for network (N)", plus refusals: always in view on the round screen. */
export function SaveStatus({ items, sending }: { items: QueuedItem[]; sending: boolean }) {
  const online = useOnline();
  const { waitingReason } = useOutbox();
  const waiting = items.filter((i) => i.state === 'pending').length;
  const refused = items.length - waiting;
  return (
    <div role="status" aria-live="polite" className="flex flex-wrap items-center gap-x-4 gap-y-1 text-lead font-semibold">
      {waiting === 0 && refused === 0 ? (
        <span className="inline-flex items-center gap-2 text-moss-700">
          <DoneMark className="h-5 w-5" /> Saved
        </span>
      ) : (
        waiting > 0 && (
          <span className="inline-flex items-center gap-2 rounded bg-caution-100 px-2 text-caution-700">
            <WaitingMark className="h-5 w-5" />
            {online && sending
              ? `Sending (${waiting})…`
              : waitingReason
                ? `Waiting (${waiting}): ${waitingReason}`
                : `Waiting for network (${waiting})`}
          </span>
        )
      )}
      {refused > 0 && (
        <span className="inline-flex items-center gap-2 rounded bg-alarm-100 px-2 text-alarm-700">
          <RefusedMark className="h-5 w-5" /> {refused} need{refused === 1 ? 's' : ''} attention
        </span>
      )}
    </div>
  );
}

interface AttentionProps {
  items: QueuedItem[];
  positionNumber: (positionId: string) => number | undefined;
  onOpen: (positionId: string) => void;
}

/** Everything the server refused, with its reason; the fitter fixes and resends, or discards on purpose. */
export function AttentionList({ items, positionNumber, onOpen }: AttentionProps) {
  const refused = items.filter((i) => i.state === 'attention');
  if (refused.length === 0) return null;
  return (
    <section aria-labelledby="attention-heading" className="space-y-2 rounded-lg border-[3px] border-alarm-700 bg-alarm-100 p-3">
      <h2 id="attention-heading" className="flex items-center gap-2 text-alarm-700">
        <RefusedMark className="h-5 w-5" /> Needs attention
      </h2>
      <ul className="space-y-2">
        {refused.map((item) => {
          const what =
            item.kind === 'round'
              ? 'The round started on this device'
              : item.kind === 'close'
                ? 'Closing the round'
                : `${item.kind === 'photo' ? 'Photo for position' : 'Position'} ${positionNumber(item.positionId) ?? '?'}`;
          return (
            <li key={item.key} className="flex flex-wrap items-center gap-2 rounded-md bg-white p-2">
              <p className="min-w-48 flex-1">
                <strong>{what}:</strong> {item.error?.message}
              </p>
              {item.kind === 'entry' && <Button onClick={() => onOpen(item.positionId)}>Open to fix</Button>}
              <Button variant="secondary" onClick={() => void retryItem(item)}>
                Send again
              </Button>
              <Button
                variant="ghost"
                onClick={() => {
                  if (window.confirm(`Discard this ${item.kind === 'photo' ? 'photo' : 'item'} (${what})? It will not be stored.`))
                    void discardItem(item);
                }}
              >
                Discard
              </Button>
            </li>
          );
        })}
      </ul>
    </section>
  );
}

/** On the rounds list: anything from any round still in this device's outbox. */
export function OutboxBanner() {
  const queryClient = useQueryClient();
  const { items } = useOutbox((item) => void queryClient.invalidateQueries({ queryKey: roundQueries.all(item.projectId) }));
  if (items.length === 0) return null;
  const rounds = [...new Map(items.map((i) => [i.roundId, i])).values()];
  const refused = items.filter((i) => i.state === 'attention').length;
  return (
    <Alert
      tone={refused ? 'error' : 'caution'}
      title={`${items.length} item(s) on this device are not stored yet${refused ? `, ${refused} refused` : ''}`}
    >
      <p>They are sent when the network is back. Open the round to see them:</p>
      <ul className="flex flex-wrap gap-2">
        {rounds.map((i) => (
          <li key={i.roundId}>
            <Link className="inline-flex min-h-touch items-center font-semibold underline" to={paths.round(i.projectId, i.roundId)}>
              Round {i.roundId.slice(0, 8)}
            </Link>
          </li>
        ))}
      </ul>
    </Alert>
  );
}
