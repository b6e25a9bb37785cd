import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router-dom';
import { queryClient } from '@/lib/query-client';
import { router } from './router';

export function App() {
  return (
    <QueryClientProvider client={queryClient}>
      {/*
        Navigations commit at once instead of in a transition: in a transition a slow machine kept
        the previous page on screen, still taking input, after a nav link was clicked, and what a
        person typed there (a new key's name on the keys page) went to the page being left.
      */}
      <RouterProvider router={router} useTransitions={false} />
    </QueryClientProvider>
  );
}
