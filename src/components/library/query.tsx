// One TanStack Query client per island, with library defaults: short stale time, refetch on focus, no retry on 4xx.
import { useState, type ReactNode } from 'react';
import { QueryClient, QueryClientProvider, type QueryKey } from '@tanstack/react-query';
import { ApiError } from '../shared/api';

/** Wraps an island in a query client, optionally seeded with server-rendered answers so nothing flashes on load. */
export function LibraryQueries({ seed = [], children }: { seed?: [QueryKey, unknown][]; children: ReactNode }) {
  const [client] = useState(() => {
    const c = new QueryClient({
      defaultOptions: {
        queries: {
          staleTime: 20_000,
          refetchOnWindowFocus: true,
          retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
        },
      },
    });
    for (const [key, data] of seed) if (data !== undefined) c.setQueryData(key, data);
    return c;
  });
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
