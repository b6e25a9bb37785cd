import { QueryCache, QueryClient } from '@tanstack/react-query';
import { isProblem } from './api-problem';
import { sessionQueryKey } from './session';

export const queryClient: QueryClient = new QueryClient({
  queryCache: new QueryCache({
    // A 401 anywhere means the session ended: refetching the session sends the shell to sign-in.
    onError: (err, query) => {
      if (isProblem(err) && err.status === 401 && query.queryKey[0] !== sessionQueryKey[0]) {
        void queryClient.invalidateQueries({ queryKey: sessionQueryKey });
      }
    },
  }),
  defaultOptions: {
    queries: {
      staleTime: 10_000,
      refetchOnWindowFocus: false,
      retry: (count, err) => !(isProblem(err) && err.status < 500) && count < 2,
    },
  },
});
