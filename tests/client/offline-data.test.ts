/**
 * Keeping a round's data on the device (src/app/offline-data.ts, decision 42): a read that found
 * nobody signed in must not stop the reads after it. This once left every later read waiting on a
 * finished one, so nothing was kept for offline use after signing in.
 */
import { QueryClient } from '@tanstack/react-query';
import { afterEach, beforeEach, expect, it, vi } from 'vitest';
import { refreshOfflineData } from '../../src/app/offline-data';
import { authQueries } from '../../src/features/auth/api';
import type { Me } from '../../shared/schemas/auth';

const asked: string[] = [];
const signedIn: Me = { user: { id: 'u1', email: 'fitter@example.com', name: 'Fitter', isAdmin: false }, memberships: [] };

beforeEach(() => {
  asked.length = 0;
  vi.stubGlobal('navigator', { onLine: true });
  // The browser's fetch, answering like the server: an empty list of drives.
  vi.stubGlobal('fetch', async (url: string) => {
    asked.push(url);
    return new Response('[]', { status: 200, headers: { 'content-type': 'application/json' } });
  });
});

afterEach(() => vi.unstubAllGlobals());

it('reads the drives once someone is signed in, after a read that found nobody', async () => {
  const queryClient = new QueryClient();
  await refreshOfflineData(queryClient); // at start, before sign-in: nothing to read
  expect(asked).toEqual([]);

  queryClient.setQueryData(authQueries.me().queryKey, signedIn);
  await refreshOfflineData(queryClient);
  expect(asked).toEqual(['/api/projects']);
});

it('does not read while the device is offline', async () => {
  vi.stubGlobal('navigator', { onLine: false });
  const queryClient = new QueryClient();
  queryClient.setQueryData(authQueries.me().queryKey, signedIn);
  await refreshOfflineData(queryClient);
  expect(asked).toEqual([]);
});
