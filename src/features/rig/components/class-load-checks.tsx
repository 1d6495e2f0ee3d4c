import { useState } from 'react';
import { useQueries, useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { Ban } from 'lucide-react';
import { loadCheckQuery, type LoadCheck, type Point } from '../../../../shared/schemas/rig';
import { Button } from '../../../components/ui/button';
import { TextField } from '../../../components/ui/field';
import { EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { rigQueries, type ClassType } from '../api';
import { apparatusLabel, type StudioFormat } from '../format';
import { preparedResolver } from '../form-helpers';
import { describeProfile } from '../profiles';
import { FactorSummary, LoadCheckView, PassWord } from './load-check-view';

/** The server's load check of the saved path, for every class type and for a profile typed by hand. */
export function ClassLoadChecks({ point, classTypes, fmt }: { point: Point; classTypes: ClassType[]; fmt: StudioFormat }) {
  const checks = useQueries({ queries: classTypes.map((ct) => rigQueries.loadCheck(point.id, { classTypeId: ct.id })) });
  return (
    <div className="space-y-4">
      {classTypes.length === 0 ? (
        <EmptyState title="No class types yet">Reception adds class types; until then, check a profile by hand below.</EmptyState>
      ) : (
        <ul className="space-y-2">
          {classTypes.map((ct, i) => {
            const q = checks[i];
            const allowed = point.apparatus.includes(ct.apparatus);
            return (
              <li key={ct.id}>
                <CheckRow
                  title={ct.name}
                  subtitle={`${apparatusLabel(ct.apparatus)}${allowed ? '' : ' — not allowed on this point'}`}
                  notAllowed={!allowed}
                  check={q.data}
                  pending={q.isPending}
                  error={q.error}
                  retry={() => q.refetch()}
                  fmt={fmt}
                />
              </li>
            );
          })}
        </ul>
      )}
      <CustomProfile pointId={point.id} fmt={fmt} />
    </div>
  );
}

function CheckRow({ title, subtitle, notAllowed = false, check, pending, error, retry, fmt, open = false }: {
  title: string;
  subtitle?: string;
  /** The point does not allow the class's apparatus: that decides, whatever the figures say. */
  notAllowed?: boolean;
  check: LoadCheck | undefined;
  pending: boolean;
  error: unknown;
  retry: () => void;
  fmt: StudioFormat;
  open?: boolean;
}) {
  return (
    <details className="rounded-lg border border-line bg-white" open={open}>
      <summary className="flex min-h-11 cursor-pointer flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2">
        {notAllowed ? <NotAllowedWord /> : null}
        <span className="font-medium">{title}</span>
        {subtitle ? <span className="text-sm text-muted">{subtitle}</span> : null}
        {notAllowed ? null : check ? <PassWord pass={check.pass} /> : pending ? <span className="text-sm text-muted">Checking…</span> : <span className="text-sm text-stop-700">Not available</span>}
        {check && !notAllowed ? <FactorSummary check={check} /> : null}
      </summary>
      <div className="space-y-2 border-t border-line p-3">
        {notAllowed ? <p className="text-sm font-medium text-stop-700">This point does not allow this apparatus, so the class cannot be booked on it. The figures below are for information only.</p> : null}
        {error ? <ErrorState error={error} retry={retry} /> : pending || !check ? <Loading label="Checking the load path…" /> : (
          <>
            {check.profile ? <p className="text-sm text-muted">{describeProfile(check.profile)}</p> : null}
            <LoadCheckView check={check} fmt={fmt} />
          </>
        )}
      </div>
    </details>
  );
}

function NotAllowedWord() {
  return (
    <span className="inline-flex items-center gap-1.5 rounded-full border border-stop-700/30 bg-stop-50 px-2.5 py-0.5 text-sm font-medium text-stop-700">
      <Ban className="size-4" aria-hidden /> Not allowed
    </span>
  );
}

const customSchema = loadCheckQuery.options[1];
interface CustomValues { performers: string; bodyMassKg: string; dynamicFactor: string }
type CustomProfileQuery = { performers: number; dynamicFactor: number; bodyMassKg?: number };

function CustomProfile({ pointId, fmt }: { pointId: number; fmt: StudioFormat }) {
  const [profile, setProfile] = useState<CustomProfileQuery | null>(null);
  const form = useForm<CustomValues, unknown, CustomProfileQuery>({
    resolver: preparedResolver<CustomValues, CustomProfileQuery>(customSchema, (v) => ({
      performers: v.performers.trim() || undefined,
      dynamicFactor: v.dynamicFactor.trim() || undefined,
      ...(v.bodyMassKg.trim() ? { bodyMassKg: v.bodyMassKg.trim() } : {}),
    })),
    defaultValues: { performers: '1', bodyMassKg: String(fmt.policy.bodyMassKg), dynamicFactor: String(fmt.policy.dynamicFactors.fabric) },
  });
  const check = useQuery({ ...rigQueries.loadCheck(pointId, profile ?? { performers: 1, dynamicFactor: 1 }), enabled: profile !== null });
  const e = form.formState.errors;
  return (
    <div className="space-y-3 rounded-lg border border-line bg-white p-3">
      <h3 className="font-semibold">A profile of your own</h3>
      <form noValidate onSubmit={form.handleSubmit((p) => setProfile(p))} className="grid gap-3 sm:grid-cols-[1fr_1fr_1fr_auto] sm:items-start" aria-label="Check a profile of your own">
        <TextField label="Performers on the point" inputMode="numeric" error={e.performers?.message && 'Between 1 and 10 performers'} {...form.register('performers')} />
        <TextField label="Body mass (kg)" inputMode="decimal" hint={`Policy: ${fmt.policy.bodyMassKg} kg`} error={e.bodyMassKg?.message && 'Between 20 and 300 kg'} {...form.register('bodyMassKg')} />
        <TextField label="Dynamic factor" inputMode="decimal" hint="Peak force as a multiple of body weight" error={e.dynamicFactor?.message && 'Between 1 and 20'} {...form.register('dynamicFactor')} />
        <Button type="submit" className="sm:mt-6">Check</Button>
      </form>
      {profile ? (
        <CheckRow title="Your profile" check={check.data} pending={check.isPending} error={check.error} retry={() => check.refetch()} fmt={fmt} open />
      ) : null}
    </div>
  );
}
