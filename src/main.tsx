import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { BrowserRouter } from 'react-router-dom';
import { MutationCache, QueryCache, QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { App } from './App';
import { authKeys } from './features/auth/api';
import { isApiError } from './lib/http';
import './styles.css';

// A 401 from any other call may mean the session ended: ask /api/auth/me
// again, which shows the sign-in page when it answers 401 too. (A wrong
// password at sign-in is also a 401; re-asking keeps that harmless.)
const onError = (e: unknown) => {
  if (isApiError(e, 401)) void queryClient.invalidateQueries({ queryKey: authKeys.me() });
};
const queryClient: QueryClient = new QueryClient({
  queryCache: new QueryCache({ onError }),
  mutationCache: new MutationCache({ onError }),
  defaultOptions: {
    queries: { retry: (count, e) => !isApiError(e) && count < 2, refetchOnWindowFocus: true, staleTime: 15_000 },
  },
});

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <BrowserRouter>
        <App />
      </BrowserRouter>
    </QueryClientProvider>
  </StrictMode>,
);
