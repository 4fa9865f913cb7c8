import { useSyncExternalStore } from 'react';
import { formatSiteDateTime } from '../../../shared/site-time';

const subscribe = (listener: () => void) => {
  window.addEventListener('online', listener);
  window.addEventListener('offline', listener);
  return () => {
    window.removeEventListener('online', listener);
    window.removeEventListener('offline', listener);
  };
};

/** Whether the browser says it has a network. */
export const useOnline = () => useSyncExternalStore(subscribe, () => navigator.onLine);

/**
 * With no network (or when `always`), says the screen shows the device's copy: "as last synced at
 * <site time>" (decision 42), with an optional further sentence.
 */
export function LastSynced({ at, timeZone, more, always = false }: { at: number; timeZone: string; more?: string; always?: boolean }) {
  const online = useOnline();
  if (online && !always) return null;
  return (
    <p data-testid="last-synced" className="rounded-md border-2 border-caution-500 bg-caution-100 px-3 py-2 font-semibold">
      {online ? 'Kept on this device' : 'No network'}: as last synced at{' '}
      {at > 0 ? formatSiteDateTime(at, timeZone, { withZone: true }) : 'an unknown time'}.{more ? ` ${more}` : ''}
    </p>
  );
}
