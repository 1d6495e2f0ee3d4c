import { useEffect, useId, useState } from 'react';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { Search } from 'lucide-react';
import { ErrorState } from '../../../components/ui/states';
import { studentsQueries, type Student } from '../api';

/**
 * Find a student by name, e-mail or phone and pick one: a search box whose matches appear as a
 * list of buttons below it (each a 44 px target). `exclude` leaves one student out (merge).
 */
export function StudentPicker({ label, onPick, exclude, autoFocus }: { label: string; onPick: (s: Student) => void; exclude?: number; autoFocus?: boolean }) {
  const id = useId();
  const [typed, setTyped] = useState('');
  const [q, setQ] = useState('');
  useEffect(() => {
    const t = setTimeout(() => setQ(typed.trim()), 250);
    return () => clearTimeout(t);
  }, [typed]);
  const found = useQuery({ ...studentsQueries.search(q), enabled: q.length > 0, placeholderData: keepPreviousData });
  const items = (found.data?.items ?? []).filter((s) => s.id !== exclude);
  return (
    <div className="space-y-2">
      <label htmlFor={id} className="block text-sm font-medium">{label}</label>
      <div className="relative">
        <Search className="pointer-events-none absolute left-3 top-1/2 size-4 -translate-y-1/2 text-muted" aria-hidden />
        <input
          id={id}
          type="search"
          value={typed}
          onChange={(e) => setTyped(e.target.value)}
          autoComplete="off"
          // eslint-disable-next-line jsx-a11y/no-autofocus
          autoFocus={autoFocus}
          aria-describedby={`${id}-hint`}
          className="block min-h-11 w-full rounded-lg border border-line bg-white py-2 pl-9 pr-3"
        />
      </div>
      <p id={`${id}-hint`} className="text-xs text-muted">Type part of a name, an e-mail address or a phone number.</p>
      {q.length === 0 ? null : found.isError ? (
        <ErrorState error={found.error} retry={() => found.refetch()} />
      ) : found.isPending ? (
        <p role="status" className="text-sm text-muted">Searching…</p>
      ) : items.length === 0 ? (
        <p role="status" className="text-sm text-muted">No student matches “{q}”.</p>
      ) : (
        <ul aria-label={`Students matching ${q}`} className="divide-y divide-line overflow-hidden rounded-xl border border-line bg-white">
          {items.map((s) => (
            <li key={s.id}>
              <button type="button" onClick={() => onPick(s)} className="flex min-h-11 w-full flex-col items-start px-3 py-2 text-left hover:bg-pine-50 focus-visible:bg-pine-50">
                <span className="font-medium">{s.name}</span>
                <span className="text-xs text-muted">{s.email}{s.phone ? ` · ${s.phone}` : ''}{s.waiver.ok ? '' : ' · no valid waiver'}</span>
              </button>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
