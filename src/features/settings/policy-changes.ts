import type { Policy } from '../../../shared/schemas/policy';

const DYNAMIC_NAMES: Record<keyof Policy['dynamicFactors'], string> = { fabric: 'fabric', hammock: 'hammock', hoop: 'hoop', rope: 'rope', straps: 'straps', trapeze: 'trapeze' };

/** Each field the owner changed, in words, as the confirmation lists them: "Required factor: 5 → 3". */
export function describePolicyChanges(before: Policy, after: Policy): string[] {
  const out: string[] = [];
  const add = (name: string, a: unknown, b: unknown, unit = '') => {
    if (JSON.stringify(a) !== JSON.stringify(b)) out.push(`${name}: ${String(a ?? '—')}${unit} → ${String(b ?? '—')}${unit}`);
  };
  add('Time zone', before.timeZone, after.timeZone);
  add('Display units', before.units, after.units);
  add('Textile interval', before.intervalDays.textile, after.intervalDays.textile, ' days');
  add('Hardware and wire rope interval', before.intervalDays.hardware, after.intervalDays.hardware, ' days');
  add('Structure interval', before.intervalDays.structure, after.intervalDays.structure, ' days');
  add('Warning window', before.warningDays, after.warningDays, ' days');
  add('Required factor', before.requiredFactor, after.requiredFactor, ' ×');
  add('Reason for a factor below 5', before.requiredFactorReason ?? null, after.requiredFactorReason ?? null);
  add('Assumed body mass', before.bodyMassKg, after.bodyMassKg, ' kg');
  for (const k of Object.keys(DYNAMIC_NAMES) as (keyof Policy['dynamicFactors'])[]) add(`Dynamic factor, ${DYNAMIC_NAMES[k]}`, before.dynamicFactors[k], after.dynamicFactors[k]);
  add('Reminder lead times', before.reminderLeadHours.join(', '), after.reminderLeadHours.join(', '), ' h');
  add('Waiver holds for', before.waiverValidMonths, after.waiverValidMonths, ' months');
  add('Students cancel up to', before.studentCancelCutoffHours, after.studentCancelCutoffHours, ' h before class');
  return out;
}
