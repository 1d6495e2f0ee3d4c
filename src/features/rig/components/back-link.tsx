import { Link } from 'react-router-dom';
import { ArrowLeft } from 'lucide-react';

export function BackLink({ to, children }: { to: string; children: string }) {
  return (
    <Link to={to} className="no-print inline-flex min-h-11 items-center gap-2 rounded-lg px-2 text-sm font-medium text-pine-700 hover:bg-pine-50">
      <ArrowLeft className="size-4" aria-hidden /> {children}
    </Link>
  );
}
