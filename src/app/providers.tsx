import { useState, type ReactNode } from 'react';
import { QueryClientProvider } from '@tanstack/react-query';
import { Toaster } from 'sonner';
import { createQueryClient } from '../lib/query-client';
import { setUnauthenticatedHandler } from '../lib/api-client';
import { authQueries } from '../features/auth/api';

export function Providers({ children }: { children: ReactNode }) {
  const [client] = useState(() => {
    const qc = createQueryClient();
    // Any 401 means the session ended (signed out elsewhere, or the account was deactivated).
    setUnauthenticatedHandler(() => qc.setQueryData(authQueries.me().queryKey, null));
    return qc;
  });
  return (
    <QueryClientProvider client={client}>
      {children}
      <Toaster position="top-center" richColors closeButton />
    </QueryClientProvider>
  );
}
