import type { ReactNode } from 'react';
import type { Role } from '../../shared/schemas/vocabulary';
import { useSignedIn } from './use-me';

export function RoleGate({ roles, children }: { roles: readonly Role[]; children: ReactNode }) {
  const me = useSignedIn();
  if (!roles.includes(me.role)) {
    return <p role="alert" className="rounded-xl border border-line bg-white p-6">This page is not part of your role. Ask the studio owner if you need it.</p>;
  }
  return <>{children}</>;
}
