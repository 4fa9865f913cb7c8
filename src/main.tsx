import '@fontsource/barlow/400.css';
import '@fontsource/barlow/600.css';
import '@fontsource/barlow/700.css';
import './styles.css';
import { StrictMode, useSyncExternalStore } from 'react';
import { createRoot } from 'react-dom/client';
import { RouterProvider } from 'react-router';
import { registerSW } from 'virtual:pwa-register';
import { AppProvider } from './app/provider';
import { authQueries } from './features/auth/api';
import { applyWaitingUpdate, offerUpdate, UPDATE_CHECK_MS, UpdateBanner } from './components/layout/update-banner';
import { startOutbox } from './lib/outbox';
import { restoreAndPersist } from './lib/persisted-cache';
import { queryClient } from './lib/query-client';

// The service worker makes the app open with no network; a new version waits for "Reload to update" (decision 42).
if ('serviceWorker' in navigator && import.meta.env.PROD) {
  registerSW({
    onNeedRefresh: () => offerUpdate(() => void applyWaitingUpdate()),
    // A tablet keeps the app open for days: look for a new version now and then, not only at page loads.
    onRegisteredSW: (_url, registration) =>
      registration &&
      window.setInterval(() => {
        if (navigator.onLine) void registration.update().catch(() => undefined);
      }, UPDATE_CHECK_MS),
  });
}

// The data last synced is restored before the router's first loaders read it, so a cold start offline shows the drive.
await restoreAndPersist(queryClient);
startOutbox(queryClient);
// What a round needs is read while online and kept on the device, screens opened or not — from
// the moment someone is signed in (the sign-in page does not load that code or the features it reads).
const keepOnceSignedIn = () => {
  if (!queryClient.getQueryData(authQueries.me().queryKey)) return false;
  void import('./app/offline-data').then((m) => m.keepRoundDataOnDevice(queryClient));
  return true;
};
if (!keepOnceSignedIn()) {
  const stop = queryClient.getQueryCache().subscribe(() => {
    if (keepOnceSignedIn()) stop();
  });
}
const { router } = await import('./app/router');

function Root() {
  const pathname = useSyncExternalStore(router.subscribe, () => router.state.location.pathname);
  return (
    <>
      <RouterProvider router={router} />
      <UpdateBanner pathname={pathname} />
    </>
  );
}

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <AppProvider>
      <Root />
    </AppProvider>
  </StrictMode>,
);
