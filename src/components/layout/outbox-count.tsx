import { useOutbox } from '../../lib/outbox';

/**
 * The app's outbox in the top bar, on every screen (decision 42): how many items wait on this
 * device, and when all are sent, that they are. Read out politely when it changes.
 */
export function OutboxCount() {
  const { items, sending, waitingReason, overtaken } = useOutbox();
  const waiting = items.filter((i) => i.state === 'pending').length;
  const refused = items.length - waiting;
  const text =
    items.length === 0
      ? 'All sent'
      : [waiting > 0 && `${waiting} waiting to send${sending ? '…' : ''}`, refused > 0 && `${refused} need attention`]
          .filter(Boolean)
          .join(' · ');
  return (
    <span
      role="status"
      aria-live="polite"
      data-testid="outbox-count"
      title={waitingReason}
      className={`inline-flex min-h-touch items-center rounded-md px-3 font-semibold ${items.length === 0 ? 'text-basalt-200' : 'bg-caution-100 text-caution-700'}`}
    >
      Outbox: {text}
      {overtaken.length > 0 && <span className="ml-2">· {overtaken.length} of your entries overtaken</span>}
    </span>
  );
}
