import { MutationCache, QueryCache, QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { ApiError } from '@/hooks/api-client';
import { authKeys } from '@/hooks/use-auth';

function makeQueryClient(): QueryClient {
  const client: QueryClient = new QueryClient({
    // A 401 from any request means the session ended (expired, signed out elsewhere, disabled):
    // refresh /me, whose 401 sends the person to the sign-in screen.
    queryCache: new QueryCache({
      onError: (err, query) => {
        if (err instanceof ApiError && err.code === 'UNAUTHENTICATED' && query.queryKey[0] !== authKeys.all[0]) {
          void client.invalidateQueries({ queryKey: authKeys.me() });
        }
      },
    }),
    mutationCache: new MutationCache({
      onError: (err) => {
        if (err instanceof ApiError && err.code === 'UNAUTHENTICATED') {
          void client.invalidateQueries({ queryKey: authKeys.me() });
        }
      },
    }),
    defaultOptions: {
      queries: {
        staleTime: 15_000,
        // Client errors (4xx) are answers; retry only network trouble and 5xx, twice.
        retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
      },
      mutations: { retry: false },
    },
  });
  return client;
}

export function Providers({ children }: { children: ReactNode }) {
  const [client] = useState(makeQueryClient);
  return (
    <SafeAreaProvider>
      <QueryClientProvider client={client}>{children}</QueryClientProvider>
    </SafeAreaProvider>
  );
}
