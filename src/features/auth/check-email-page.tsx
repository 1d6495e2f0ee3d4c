import { Link, useLocation } from 'react-router-dom';
import { MailCheck } from 'lucide-react';
import { paths } from '../../lib/paths';

/** After "e-mail me a link": the same words whether or not the address is a student's. */
export function CheckEmailPage() {
  const email = (useLocation().state as { email?: string } | null)?.email;
  return (
    <div className="flex min-h-screen items-center justify-center bg-pine-700 p-4">
      <main className="w-full max-w-sm space-y-4 rounded-2xl bg-white p-8 shadow-lg">
        <MailCheck className="size-10 text-pine-700" aria-hidden />
        <h1 className="text-xl font-semibold">Check your e-mail</h1>
        <p>
          If {email ? <strong className="break-all">{email}</strong> : 'the address'} belongs to a student of the studio, a sign-in link is on its way. It works once, for 30 minutes.
        </p>
        <p className="text-sm text-muted">Nothing arrived after a few minutes? Check the spam folder, or ask at the desk which address the studio has for you.</p>
        <div className="flex flex-wrap gap-4 text-sm">
          <Link to={paths.signIn} className="text-pine-700 underline">Ask for another link</Link>
          <Link to={paths.timetable} className="text-pine-700 underline">See the timetable</Link>
        </div>
      </main>
    </div>
  );
}
