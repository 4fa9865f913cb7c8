import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';

export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      // Kept (and persisted to the device) for a week, so a fitter offline at the face still sees the data (decision 42).
      gcTime: 7 * 24 * 60 * 60 * 1000,
      // Do not retry what the server refused on purpose.
      retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
    },
  },
});
