import { dismissOvertakenNotices, useOvertaken } from '../../features/rounds/overtaken';
import { dismissOvertaken, useOutbox } from '../../lib/outbox';

/**
 * The app's outbox in the top bar, on every screen (decision 42): how many items wait on this
 * device, and when all are sent, that they are. Read out politely when it changes.
 */
export function OutboxCount({ projectId }: { projectId?: string }) {
  const { items, sending, waitingReason, overtaken: sentOvertaken } = useOutbox();
  // The server knows of overtaken entries in both arrival orders; without a drive open, this
  // device's own answers are what there is (decision 42).
  const { undismissed } = useOvertaken(projectId);
  const overtakenCount = projectId ? undismissed.length : sentOvertaken.length;
  const dismiss = () => {
    dismissOvertakenNotices(undismissed.map((o) => o.id));
    dismissOvertaken();
  };
  const waiting = items.filter((i) => i.state === 'pending').length;
  const refused = items.length - waiting;
  const text =
    items.length === 0
      ? 'All sent'
      : [waiting > 0 && `${waiting} waiting to send${sending ? '…' : ''}`, refused > 0 && `${refused} need attention`]
          .filter(Boolean)
          .join(' · ');
  return (
    <>
      <span
        role="status"
        aria-live="polite"
        data-testid="outbox-count"
        title={waitingReason}
        className={`inline-flex min-h-touch items-center rounded-md px-3 font-semibold ${items.length === 0 ? 'text-basalt-200' : 'bg-caution-100 text-caution-700'}`}
      >
        Outbox: {text}
        {overtakenCount > 0 && <span className="ml-2">· {overtakenCount} of your entries overtaken</span>}
      </span>
      {overtakenCount > 0 && (
        <button type="button" onClick={dismiss} className="min-h-touch rounded-md px-3 font-semibold text-basalt-100 hover:bg-basalt-800">
          Dismiss overtaken notice
        </button>
      )}
    </>
  );
}
