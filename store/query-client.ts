/**
 * The app's react-query client. Client errors (4xx) are answers, not glitches: retrying them only
 * delays the message, so only network failures and 5xx are retried, twice.
 */
import { QueryClient } from '@tanstack/react-query';

import { isApiRequestError } from './api';

export function createQueryClient() {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        retry: (failureCount, error) => {
          if (isApiRequestError(error) && error.status >= 400 && error.status < 500) return false;
          return failureCount < 2;
        },
      },
      mutations: { retry: false },
    },
  });
}
