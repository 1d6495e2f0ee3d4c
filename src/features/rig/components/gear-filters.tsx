import { useEffect, useState } from 'react';
import { Search } from 'lucide-react';
import { gearKindLabels } from '../../../../shared/rigging';
import type { GearListQuery } from '../../../../shared/schemas/rig';
import { gearKinds, gearStatuses } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { gearStatusLabels } from '../format';

const FILTER_KEYS = ['q', 'kind', 'status', 'inspectionDueDays', 'lifeEndingDays', 'mounted'] as const;

/** Filters kept in the address, so a filtered list can be bookmarked or shared. */
export function filtersFrom(params: URLSearchParams): GearListQuery {
  const out: Record<string, string | number> = {};
  for (const key of FILTER_KEYS) {
    const v = params.get(key)?.trim();
    if (!v) continue;
    out[key] = key.endsWith('Days') ? Number(v) : v;
  }
  const days = (n: unknown) => (typeof n === 'number' && Number.isInteger(n) && n >= 0 ? n : undefined);
  return {
    q: out.q as string | undefined,
    kind: gearKinds.includes(out.kind as never) ? (out.kind as GearListQuery['kind']) : undefined,
    status: gearStatuses.includes(out.status as never) ? (out.status as GearListQuery['status']) : undefined,
    inspectionDueDays: days(out.inspectionDueDays),
    lifeEndingDays: days(out.lifeEndingDays),
    mounted: out.mounted === 'yes' || out.mounted === 'no' ? out.mounted : undefined,
  };
}

export function GearFilters({ params, onChange }: { params: URLSearchParams; onChange: (next: URLSearchParams) => void }) {
  const [q, setQ] = useState(params.get('q') ?? '');
  const set = (key: (typeof FILTER_KEYS)[number], value: string) => {
    const next = new URLSearchParams(params);
    if (value.trim()) next.set(key, value.trim());
    else next.delete(key);
    onChange(next);
  };
  // Search as the rigger types, once they pause.
  useEffect(() => {
    if (q === (params.get('q') ?? '')) return;
    const t = setTimeout(() => set('q', q), 300);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [q]);
  const dayField = (key: 'inspectionDueDays' | 'lifeEndingDays', label: string, hint: string) => (
    <TextField label={label} inputMode="numeric" placeholder="Any" hint={hint} value={params.get(key) ?? ''} onChange={(e) => set(key, e.target.value.replace(/\D/g, ''))} />
  );
  const any = FILTER_KEYS.some((k) => params.get(k));
  return (
    <form role="search" aria-label="Find gear" onSubmit={(e) => { e.preventDefault(); set('q', q); }} className="mb-4 grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-3">
      <div className="relative sm:col-span-3">
        <TextField label="Search serial, maker or model" type="search" value={q} onChange={(e) => setQ(e.target.value)} className="pl-10" />
        <Search className="pointer-events-none absolute bottom-3.5 left-3 size-4 text-muted" aria-hidden />
      </div>
      <SelectField label="Kind" value={params.get('kind') ?? ''} onChange={(e) => set('kind', e.target.value)}>
        <option value="">All kinds</option>
        {gearKinds.map((k) => <option key={k} value={k}>{gearKindLabels[k]}</option>)}
      </SelectField>
      <SelectField label="Status" value={params.get('status') ?? ''} onChange={(e) => set('status', e.target.value)}>
        <option value="">Any status</option>
        {gearStatuses.map((s) => <option key={s} value={s}>{gearStatusLabels[s]}</option>)}
      </SelectField>
      <SelectField label="Mounted" value={params.get('mounted') ?? ''} onChange={(e) => set('mounted', e.target.value)}>
        <option value="">Mounted or spare</option>
        <option value="yes">In a point’s load path</option>
        <option value="no">Spare (not in any path)</option>
      </SelectField>
      {dayField('inspectionDueDays', 'Inspection due within (days)', 'Includes items already due or never inspected.')}
      {dayField('lifeEndingDays', 'Service life ending within (days)', 'Includes items already past it.')}
      <div className="flex items-start sm:pt-6">
        {any ? <Button type="button" variant="secondary" onClick={() => { setQ(''); onChange(new URLSearchParams()); }}>Clear filters</Button> : null}
      </div>
    </form>
  );
}
