import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { CircleCheck, TriangleAlert } from 'lucide-react';
import { signWaiverSchema, type SignWaiver } from '../../../shared/schemas/my';
import { Button } from '../../components/ui/button';
import { TextField } from '../../components/ui/field';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { ApiError, errorMessage } from '../../lib/api-client';
import { studentPortalQueries, useSignWaiver } from './api';
import { useWarnBeforeUnload } from '../../lib/use-warn-before-unload';

/** The studio's waiver: read it, type your full name, sign (PRODUCT.md §11). */
export function WaiverPage() {
  const waiver = useQuery(studentPortalQueries.waiver());
  const studio = useQuery(studentPortalQueries.studio());
  const sign = useSignWaiver();
  const form = useForm<SignWaiver>({ resolver: zodResolver(signWaiverSchema), defaultValues: { version: 0, fullName: '' } });
  // A typed signature is not lost to a reload or a closed tab without asking.
  useWarnBeforeUnload(form.formState.isDirty);
  const tz = studio.data?.timeZone ?? 'UTC';

  if (waiver.isPending) return <Loading label="Loading the waiver…" />;
  if (waiver.isError) return <ErrorState error={waiver.error} retry={() => waiver.refetch()} />;
  const { current, accepted, valid } = waiver.data;

  const submit = form.handleSubmit(async (values) => {
    try {
      await sign.mutateAsync(values);
      toast.success('Thank you: your waiver is signed.');
      form.reset({ version: 0, fullName: '' });
    } catch (err) {
      if (err instanceof ApiError && err.fields.fullName) form.setError('fullName', { message: err.fields.fullName });
      else toast.error(errorMessage(err));
      if (err instanceof ApiError && err.code === 'waiver_version_outdated') void waiver.refetch();
    }
  });

  return (
    <div className="space-y-4">
      <PageHeader title="Waiver">Every student signs the studio’s waiver before class.</PageHeader>
      {valid && accepted ? (
        <p role="status" className="flex items-start gap-2 rounded-xl bg-ok-50 p-4 text-ok-700">
          <CircleCheck className="mt-0.5 size-5 shrink-0" aria-hidden />
          <span>Signed (version {accepted.version}). Valid until {formatInZone(accepted.validUntil, tz, 'day')}.</span>
        </p>
      ) : (
        <p role="status" className="flex items-start gap-2 rounded-xl bg-warn-50 p-4 text-warn-700">
          <TriangleAlert className="mt-0.5 size-5 shrink-0" aria-hidden />
          <span>{accepted ? 'Your waiver has run out or a new version needs signing.' : 'You have not signed the waiver yet.'} You cannot be checked in to a class without it.</span>
        </p>
      )}
      {!current ? (
        <EmptyState title="The studio has not published its waiver yet">Ask at the desk: you can sign a paper copy there.</EmptyState>
      ) : (
        <Card className="space-y-4">
          <h2 className="font-semibold">Version {current.version}</h2>
          <div className="max-h-80 overflow-y-auto whitespace-pre-wrap rounded-lg border border-line bg-canvas p-3 text-sm leading-relaxed" tabIndex={0} aria-label="Waiver text">
            {current.text}
          </div>
          {valid && accepted?.version === current.version ? null : (
            <form
              onSubmit={(e) => {
                form.setValue('version', current.version);
                void submit(e);
              }}
              noValidate
              className="space-y-3"
            >
              <TextField label="Type your full name to sign" autoComplete="name" error={form.formState.errors.fullName?.message} {...form.register('fullName')} />
              <Button type="submit" className="w-full" busy={form.formState.isSubmitting}>
                Sign the waiver
              </Button>
            </form>
          )}
        </Card>
      )}
    </div>
  );
}
