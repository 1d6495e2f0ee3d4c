import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQueryClient } from '@tanstack/react-query';
import { useLocation, useNavigate } from 'react-router-dom';
import { signInSchema, type SignIn } from '../../../shared/schemas/staff';
import { TextField } from '../../components/ui/field';
import { Button } from '../../components/ui/button';
import { errorMessage } from '../../lib/api-client';
import { authQueries, signIn } from './api';

export function SignInPage() {
  const qc = useQueryClient();
  const navigate = useNavigate();
  const location = useLocation();
  const [failure, setFailure] = useState<string | null>(null);
  const form = useForm<SignIn>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  const from = (location.state as { from?: string } | null)?.from ?? '/';

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
      </main>
    </div>
  );
}
