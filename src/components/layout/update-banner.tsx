import { useSyncExternalStore } from 'react';
import { matchPath } from 'react-router';
import { paths } from '../../config/paths';
import { Button } from '../ui/button';

/** A new build of the app is installed and waiting; `apply` switches to it and reloads. */
let waiting: (() => void) | null = null;
const listeners = new Set<() => void>();
export function offerUpdate(apply: () => void) {
  waiting = apply;
  listeners.forEach((l) => l());
}
const subscribe = (l: () => void) => {
  listeners.add(l);
  return () => void listeners.delete(l);
};

/**
 * Switches to the waiting version and reloads once it controls the page. Not left to the PWA
 * plugin's `updateSW(true)`: that reloads only in a page that was already controlled when it
 * loaded, so a fitter who first opened the app in this very tab pressed the button and nothing
 * happened (found by tests/e2e/service-worker.test.ts).
 */
export async function applyWaitingUpdate() {
  let reloading = false;
  const reload = () => {
    if (reloading) return;
    reloading = true;
    window.location.reload();
  };
  navigator.serviceWorker.addEventListener('controllerchange', reload);
  const registration = await navigator.serviceWorker.getRegistration();
  // Another tab may have switched already: then this page only needs the reload.
  if (registration?.waiting) registration.waiting.postMessage({ type: 'SKIP_WAITING' });
  else reload();
}

/** How often an open app asks the server for a new version (besides every page load). */
export const UPDATE_CHECK_MS = 30 * 60_000;

/** Round screens: a reload there would break a fitter's flow, so the offer waits until they leave (decision 42). */
export const isRoundScreen = (pathname: string) =>
  matchPath(paths.rounds.pattern, pathname) != null || matchPath(paths.round.pattern, pathname) != null;

/** "Reload to update", shown when a new version waits — never on a round screen. */
export function UpdateBanner({ pathname }: { pathname: string }) {
  const apply = useSyncExternalStore(subscribe, () => waiting);
  if (!apply || isRoundScreen(pathname)) return null;
  return (
    <div
      role="status"
      className="no-print fixed bottom-4 left-4 z-50 flex items-center gap-3 rounded-md bg-basalt-900 px-4 py-2 text-white shadow-lg"
    >
      <span>A new version of Kerfwise is ready.</span>
      <Button onClick={apply}>Reload to update</Button>
    </div>
  );
}
