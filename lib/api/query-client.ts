import { QueryClient } from '@tanstack/react-query';
import { ApiError } from '@/lib/api/client';

/** The app's one QueryClient, created once at module load (never during render). */
export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      staleTime: 30_000,
      retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
      refetchOnWindowFocus: false,
    },
  },
});
