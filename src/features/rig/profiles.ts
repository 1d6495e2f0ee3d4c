import type { LoadProfile } from '../../../shared/rigging';
import type { Policy } from '../../../shared/schemas/policy';
import type { ApparatusKind } from '../../../shared/schemas/vocabulary';
import type { ClassType } from './api';

/** A class type's load profile: its own figures where set, the policy's otherwise (PRODUCT.md §3). */
export function profileOf(ct: ClassType, policy: Policy): LoadProfile {
  return {
    performers: ct.performersPerPoint,
    bodyMassKg: ct.bodyMassKg ?? policy.bodyMassKg,
    dynamicFactor: ct.dynamicFactor ?? policy.dynamicFactors[ct.apparatus],
  };
}

/** Where a studio has no class types yet: one performer on the given apparatus, with the policy's figures. */
export function soloProfile(apparatus: ApparatusKind, policy: Policy): LoadProfile {
  return { performers: 1, bodyMassKg: policy.bodyMassKg, dynamicFactor: policy.dynamicFactors[apparatus] };
}

export function describeProfile(p: LoadProfile): string {
  return `${p.performers} ${p.performers === 1 ? 'performer' : 'performers'} × ${p.bodyMassKg} kg × dynamic factor ${p.dynamicFactor}`;
}
