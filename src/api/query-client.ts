import { MutationCache, QueryClient } from '@tanstack/react-query';
import { ApiError } from './client';
import { forgetPageAnswers } from './page-data';

/** How long fetched data counts as fresh before a screen refetches it in the background. */
export const STALE_TIME_MS = 30_000;
const MAX_RETRIES = 2;

export function createQueryClient(): QueryClient {
  return new QueryClient({
    // A write makes the page's answers out of date (see page-data.ts): screens ask again.
    mutationCache: new MutationCache({ onSuccess: () => forgetPageAnswers() }),
    defaultOptions: {
      queries: {
        staleTime: STALE_TIME_MS,
        // A refusal (4xx) will not change on retry; a dropped connection or 5xx may.
        retry: (failures, error) =>
          failures < MAX_RETRIES && !(error instanceof ApiError && error.status >= 400 && error.status < 500),
        refetchOnWindowFocus: true,
      },
      mutations: { retry: false },
    },
  });
}
