import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQueryClient } from '@tanstack/react-query';
import { Link, useLocation, useNavigate, useSearchParams } from 'react-router-dom';
import { signInSchema, type SignIn } from '../../../shared/schemas/staff';
import { TextField } from '../../components/ui/field';
import { Button } from '../../components/ui/button';
import { errorMessage } from '../../lib/api-client';
import { authQueries, signIn } from './api';
import { askForSignInLink } from '../student-portal/api';
import { paths } from '../../lib/paths';
import { z } from 'zod';

const linkSchema = z.object({ email: z.string().trim().pipe(z.email({ message: 'Enter an e-mail address such as name@example.test' })) });
type LinkForm = z.infer<typeof linkSchema>;

/** Students sign in by a link e-mailed to them (PRODUCT.md §11); the page says the same for any address. */
function EmailLinkForm({ next }: { next: string }) {
  const navigate = useNavigate();
  const [failure, setFailure] = useState<string | null>(null);
  const form = useForm<LinkForm>({ resolver: zodResolver(linkSchema), defaultValues: { email: '' } });
  const submit = form.handleSubmit(async ({ email }) => {
    setFailure(null);
    try {
      await askForSignInLink(email, next);
      navigate(paths.checkEmail, { state: { email } });
    } catch (err) {
      setFailure(errorMessage(err));
    }
  });
  return (
    <form onSubmit={submit} className="space-y-4" noValidate>
      <h2 className="font-semibold">Students: sign in by e-mail</h2>
      <p className="text-sm text-muted">Book classes, see your bookings and sign the waiver. We e-mail you a link; no password needed.</p>
      <TextField label="Your e-mail" type="email" autoComplete="email" error={form.formState.errors.email?.message} {...form.register('email')} />
      {failure ? (
        <p role="alert" className="rounded-lg bg-stop-50 px-3 py-2 text-sm text-stop-700">
          {failure}
        </p>
      ) : null}
      <Button type="submit" variant="secondary" className="w-full" busy={form.formState.isSubmitting}>
        E-mail me a link
      </Button>
    </form>
  );
}

export function SignInPage() {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const location = useLocation();
  const [failure, setFailure] = useState<string | null>(null);
  const form = useForm<SignIn>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  const from = (location.state as { from?: string } | null)?.from ?? '/';
  const [params] = useSearchParams();
  const linkError = params.get('error');
  const studentNext = from.startsWith('/my/') || from.startsWith(paths.timetable) ? from : paths.myBookings;

  const submit = form.handleSubmit(async (values) => {
    setFailure(null);
    try {
      await signIn(values.email, values.password);
      await qc.invalidateQueries({ queryKey: authQueries.all });
      await qc.fetchQuery(authQueries.me());
      navigate(from, { replace: true });
    } catch (err) {
      setFailure(errorMessage(err));
    }
  });

  return (
    <div className="flex min-h-screen items-center justify-center bg-pine-700 p-4">
      <main className="w-full max-w-sm rounded-2xl bg-white p-8 shadow-lg">
        <div className="mb-6 flex items-center gap-3">
          <img src="/mark.svg" alt="" className="size-10" />
          <div>
            <h1 className="text-xl font-semibold">Sign in to Loftwise</h1>
            <p className="text-sm text-muted">The studio’s rig and class calendar</p>
          </div>
        </div>
        {linkError ? (
          <p role="alert" className="mb-4 rounded-lg bg-stop-50 px-3 py-2 text-sm text-stop-700">
            {linkError === 'Verification' ? 'That sign-in link has expired or was already used. Ask for a new one below.' : 'Signing in did not work. Try again.'}
          </p>
        ) : null}
        <form onSubmit={submit} className="space-y-4" noValidate>
          <TextField label="E-mail" type="email" autoComplete="username" error={form.formState.errors.email?.message} {...form.register('email')} />
          <TextField label="Password" type="password" autoComplete="current-password" error={form.formState.errors.password?.message} {...form.register('password')} />
          {failure ? (
            <p role="alert" className="rounded-lg bg-stop-50 px-3 py-2 text-sm text-stop-700">
              {failure}
            </p>
          ) : null}
          <Button type="submit" className="w-full" busy={form.formState.isSubmitting}>
            Sign in
          </Button>
        </form>
        <hr className="my-6 border-line" />
        <EmailLinkForm next={studentNext} />
        <p className="mt-6 text-center text-sm">
          <Link to={paths.timetable} className="text-pine-700 underline">See the class timetable</Link>
        </p>
      </main>
    </div>
  );
}
