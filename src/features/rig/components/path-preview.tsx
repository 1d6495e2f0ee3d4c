import { useMemo } from 'react';
import { checkLoadPath, type LinkInput, type LoadCheckResult, type LoadProfile } from '../../../../shared/rigging';
import type { Gear } from '../../../../shared/schemas/rig';
import type { ApparatusKind } from '../../../../shared/schemas/vocabulary';
import { requiredFactorReasonOf } from '../../../../shared/schemas/policy';
import type { ClassType } from '../api';
import type { StudioFormat } from '../format';
import { describeProfile, profileOf, soloProfile } from '../profiles';
import { FactorSummary, LoadCheckView, PassWord } from './load-check-view';

interface PreviewRow {
  key: string;
  name: string;
  profile: LoadProfile;
  result: LoadCheckResult | null;
  error?: string;
}

/**
 * The load check of the edited, unsaved path for each class type, worked out here with the same
 * shared rules the server runs, so the rigger sees the outcome before saving.
 */
export function PathPreview({ links, structuralRatingKn, classTypes, fmt, apparatus }: {
  links: LinkInput<Gear>[];
  structuralRatingKn: number;
  classTypes: ClassType[];
  fmt: StudioFormat;
  /** For the fallback profile when the studio has no class types yet. */
  apparatus: ApparatusKind;
}) {
  const rows = useMemo<PreviewRow[]>(() => {
    const profiles = classTypes.length
      ? classTypes.map((ct) => ({ key: `ct${ct.id}`, name: ct.name, profile: profileOf(ct, fmt.policy) }))
      : [{ key: 'solo', name: 'One performer (no class types yet)', profile: soloProfile(apparatus, fmt.policy) }];
    return profiles.map((p) => {
      try {
        const result = checkLoadPath({ links, structuralRatingKn, profile: p.profile, requiredFactor: fmt.policy.requiredFactor, requiredFactorReason: requiredFactorReasonOf(fmt.policy), displayUnit: fmt.unit });
        return { ...p, result };
      } catch (err) {
        return { ...p, result: null, error: err instanceof Error ? err.message : 'The preview could not be worked out.' };
      }
    });
  }, [links, structuralRatingKn, classTypes, fmt, apparatus]);

  return (
    <section aria-labelledby="preview-heading" className="space-y-3">
      <div>
        <h3 id="preview-heading" className="font-semibold">Preview of the load check (not saved)</h3>
        <p className="text-sm text-muted">Worked out in this page from the path as edited, for each class profile. The server checks it again on saving.</p>
      </div>
      <ul className="space-y-2" aria-live="polite">
        {rows.map((row) => (
          <li key={row.key}>
            <details className="rounded-lg border border-line bg-white">
              <summary className="flex min-h-11 cursor-pointer flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2">
                <span className="font-medium">{row.name}</span>
                {row.result ? <PassWord pass={row.result.pass} /> : <span className="text-sm text-stop-700">Cannot be worked out</span>}
                {row.result ? (
                  <span className="text-sm text-muted">
                    <FactorSummary check={row.result} />
                    {row.result.violations.length ? ` · ${row.result.violations.length} failing` : ''}
                    {row.result.warnings.length ? ` · ${row.result.warnings.length} warning${row.result.warnings.length === 1 ? '' : 's'}` : ''}
                  </span>
                ) : null}
              </summary>
              <div className="space-y-2 border-t border-line p-3">
                <p className="text-sm text-muted">{describeProfile(row.profile)}</p>
                {row.result ? <LoadCheckView check={row.result} fmt={fmt} /> : <p role="alert" className="text-sm text-stop-700">{row.error}</p>}
              </div>
            </details>
          </li>
        ))}
      </ul>
    </section>
  );
}
