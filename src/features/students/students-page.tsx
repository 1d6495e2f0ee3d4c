import { useEffect, useState } from 'react';
import { keepPreviousData, useInfiniteQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router-dom';
import { Search, UserPlus } from 'lucide-react';
import type { Me } from '../../../shared/schemas/staff';
import { Button } from '../../components/ui/button';
import { Card, EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { paths } from '../../lib/paths';
import { studentsQueries } from './api';
import { StudentFormSheet } from './components/student-form';

const DEBOUNCE_MS = 300;

/** The desk's students: search by name, e-mail or phone, a page at a time, and add a new one. */
export function StudentsPage({ me }: { me: Me }) {
  const [params, setParams] = useSearchParams();
  const q = params.get('q') ?? '';
  // What is typed shows at once; the address (and the request) follows once typing pauses.
  const [typed, setTyped] = useState(q);
  useEffect(() => setTyped(q), [q]);
  useEffect(() => {
    if (typed.trim() === q) return;
    const t = setTimeout(() => setParams((prev) => { const n = new URLSearchParams(prev); if (typed.trim()) n.set('q', typed.trim()); else n.delete('q'); return n; }, { replace: true }), DEBOUNCE_MS);
    return () => clearTimeout(t);
  }, [typed]); // eslint-disable-line react-hooks/exhaustive-deps
  const list = useInfiniteQuery({ ...studentsQueries.list(q), placeholderData: keepPreviousData });
  const canEdit = me.role === 'owner' || me.role === 'reception';
  const [adding, setAdding] = useState(false);
  const rows = list.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <div className="max-w-5xl">
      <PageHeader title="Students" actions={canEdit ? <Button onClick={() => setAdding(true)}><UserPlus className="size-4" aria-hidden /> Add a student</Button> : null}>
        {canEdit ? 'The people who take the studio’s classes. Open one to see their bookings and waiver.' : 'The people who take the studio’s classes.'}
      </PageHeader>
      <form role="search" className="mb-4 max-w-md" onSubmit={(e) => e.preventDefault()}>
        <label htmlFor="student-search" className="block text-sm font-medium">Search by name, e-mail or phone</label>
        <div className="relative mt-1">
          <Search className="pointer-events-none absolute left-3 top-1/2 size-4 -translate-y-1/2 text-muted" aria-hidden />
          <input
            id="student-search"
            type="search"
            value={typed}
            onChange={(e) => setTyped(e.target.value)}
            autoComplete="off"
            className="block min-h-11 w-full rounded-lg border border-line bg-white py-2 pl-9 pr-3"
          />
        </div>
      </form>
      <div aria-live="polite" className="sr-only">{list.isFetching && !list.isFetchingNextPage ? 'Searching…' : list.data ? `${rows.length}${list.hasNextPage ? ' or more' : ''} students shown` : ''}</div>
      {list.isPending ? <Loading label="Loading students…" /> : !list.data ? <ErrorState error={list.error} retry={() => list.refetch()} /> : rows.length === 0 ? (
        q ? (
          <EmptyState title={`No student matches “${q}”`}>Check the spelling, or search by e-mail or phone instead.{canEdit ? ' A new student is added with “Add a student”.' : ''}</EmptyState>
        ) : (
          <EmptyState title="No students yet">{canEdit ? 'Add the first one with “Add a student”.' : 'Reception adds students.'}</EmptyState>
        )
      ) : (
        <Card className={`overflow-x-auto p-0 ${list.isPlaceholderData ? 'opacity-60' : ''}`}>
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Students{q ? ` matching “${q}”` : ''}</caption>
            <thead className="border-b border-line bg-pine-50 text-xs uppercase tracking-wide text-muted">
              <tr>
                <th scope="col" className="px-4 py-3">Name</th>
                <th scope="col" className="px-4 py-3">E-mail</th>
                <th scope="col" className="px-4 py-3">Phone</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((s) => (
                <tr key={s.id} className="border-b border-line last:border-0">
                  <td className="px-4 py-1"><Link to={paths.student(s.id)} className="inline-flex min-h-11 items-center font-medium text-pine-700 underline-offset-2 hover:underline">{s.name}</Link></td>
                  <td className="break-all px-4 py-3">{s.email}</td>
                  <td className="px-4 py-3">{s.phone ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </Card>
      )}
      {list.hasNextPage ? (
        <div className="mt-4">
          <Button variant="secondary" onClick={() => list.fetchNextPage()} busy={list.isFetchingNextPage}>Load more</Button>
        </div>
      ) : null}
      {list.isFetchNextPageError ? <div className="mt-2"><ErrorState error={list.error} retry={() => list.fetchNextPage()} /></div> : null}
      {canEdit ? <StudentFormSheet open={adding} onClose={() => setAdding(false)} /> : null}
    </div>
  );
}
