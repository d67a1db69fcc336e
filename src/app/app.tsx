import { QueryClientProvider } from '@tanstack/react-query';
import { useState } from 'react';
import { createAppQueryClient } from '@/app/query-client';
import { AppRouter } from '@/app/router';

export function App() {
  const [queryClient] = useState(createAppQueryClient);
  return (
    <QueryClientProvider client={queryClient}>
      <AppRouter queryClient={queryClient} />
    </QueryClientProvider>
  );
}
