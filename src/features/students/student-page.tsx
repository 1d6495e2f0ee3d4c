import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { ArrowLeft, Merge, Pencil } from 'lucide-react';
import type { Me } from '../../../shared/schemas/staff';
import { Button } from '../../components/ui/button';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { formatInZone } from '../../components/ui/zoned-time';
import { ApiError } from '../../lib/api-client';
import { paths } from '../../lib/paths';
import { useStudioTimeZone } from '../today/api';
import { studentsQueries, type StudentBooking, type StudentDetail } from './api';
import { PlaceBadge, WaiverBadge } from './components/badges';
import { StudentFormSheet } from './components/student-form';
import { PaperWaiverForm } from './components/paper-waiver-form';
import { MergeStudent } from './components/merge-student';

/** The studio's calendar day of an instant, 'YYYY-MM-DD'. */
const dayOf = (iso: string, timeZone: string) => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(iso));

/** One student: contact, emergency contact, waiver, bookings ahead and past, attendance. */
export function StudentPage({ id, me }: { id: number; me: Me }) {
  const q = useQuery(studentsQueries.detail(id));
  const zone = useStudioTimeZone();
  if (q.isPending || zone.isPending) return <Loading label="Loading the student…" />;
  if (q.isError) {
    if (q.error instanceof ApiError && q.error.status === 404) {
      const into = (q.error.details as { mergedIntoId?: number } | undefined)?.mergedIntoId;
      return (
        <p className="rounded-xl border border-line bg-white p-6">
          {into ? <>This student record was merged into another one. <Link className="text-pine-700 underline" to={paths.student(into)}>Open the record kept</Link></> : <>There is no student with this number. <Link className="text-pine-700 underline" to={paths.students}>Back to Students</Link></>}
        </p>
      );
    }
    return <ErrorState error={q.error} retry={() => q.refetch()} />;
  }
  if (zone.isError) return <ErrorState error={zone.error} retry={() => zone.refetch()} />;
  return <StudentBody student={q.data} me={me} timeZone={zone.data} />;
}

function StudentBody({ student: s, me, timeZone }: { student: StudentDetail; me: Me; timeZone: string }) {
  const canEdit = me.role === 'owner' || me.role === 'reception';
  const [editing, setEditing] = useState(false);
  const [merging, setMerging] = useState(false);
  const w = s.waiver;
  return (
    <div className="max-w-4xl space-y-5">
      <Link to={paths.students} className="inline-flex min-h-11 items-center gap-1 text-sm font-medium text-pine-700"><ArrowLeft className="size-4" aria-hidden /> Students</Link>
      <PageHeader
        title={s.name}
        actions={canEdit ? (
          <>
            <Button variant="secondary" onClick={() => setEditing(true)}><Pencil className="size-4" aria-hidden /> Edit</Button>
            {me.role === 'owner' ? <Button variant="secondary" aria-expanded={merging} onClick={() => setMerging((m) => !m)}><Merge className="size-4" aria-hidden /> Merge a duplicate</Button> : null}
          </>
        ) : null}
      >
        {s.attendanceCount === 1 ? 'Attended 1 class' : `Attended ${s.attendanceCount} classes`}
      </PageHeader>
      {merging ? <MergeStudent student={s} onClose={() => setMerging(false)} /> : null}
      <div className="grid gap-5 md:grid-cols-2">
        <Card>
          <h2 className="mb-3 font-semibold">Contact</h2>
          <dl className="grid grid-cols-[7rem_1fr] gap-x-3 gap-y-2 text-sm">
            <dt className="text-muted">E-mail</dt>
            <dd className="break-all"><a className="text-pine-700 underline" href={`mailto:${s.email}`}>{s.email}</a></dd>
            <dt className="text-muted">Phone</dt>
            <dd>{s.phone ?? '—'}</dd>
            <dt className="text-muted">Emergency</dt>
            <dd>{s.emergencyName || s.emergencyPhone ? <>{s.emergencyName ?? 'No name given'}{s.emergencyPhone ? <>, {s.emergencyPhone}</> : null}</> : 'No emergency contact given'}</dd>
          </dl>
        </Card>
        <Card>
          <h2 className="mb-3 flex flex-wrap items-center gap-2 font-semibold">Waiver <WaiverBadge state={w.state} /></h2>
          <p className="text-sm" data-testid="waiver-state">
            {w.state === 'missing' ? 'No signed waiver on record. They can be booked, but not checked in until one is recorded.' : (
              <>
                Version {w.version}, {w.method === 'paper' ? 'signed on paper' : 'accepted online'} on {formatInZone(w.acceptedAt, timeZone, 'day')};{' '}
                {w.state === 'valid' ? <>holds until {formatInZone(w.validUntil, timeZone, 'day')}.</> : <>expired on {formatInZone(w.validUntil, timeZone, 'day')}. They cannot be checked in until a new one is recorded.</>}
              </>
            )}
          </p>
          {canEdit ? <PaperWaiverForm student={s} timeZone={timeZone} /> : null}
        </Card>
      </div>
      <Bookings title="Coming up" empty="No classes booked ahead." rows={s.upcoming} timeZone={timeZone} />
      <Bookings title="Past classes" empty="No past classes yet." rows={s.past} timeZone={timeZone} />
      {canEdit ? <StudentFormSheet open={editing} student={s} onClose={() => setEditing(false)} /> : null}
    </div>
  );
}

function Bookings({ title, empty, rows, timeZone }: { title: string; empty: string; rows: StudentBooking[]; timeZone: string }) {
  const headingId = `bookings-${title.replace(/\W+/g, '-').toLowerCase()}`;
  return (
    <section aria-labelledby={headingId} className="rounded-xl border border-line bg-white p-5">
      <h2 id={headingId} className="mb-3 font-semibold">{title}</h2>
      {rows.length === 0 ? <p className="text-sm text-muted">{empty}</p> : (
        <ul className="divide-y divide-line">
          {rows.map((b) => (
            <li key={b.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
              <span>
                <Link to={paths.scheduleClass(b.sessionId, dayOf(b.startsAt, timeZone))} className="font-medium text-pine-700 underline-offset-2 hover:underline">{b.className}</Link>
                <span className="text-muted"> · {formatInZone(b.startsAt, timeZone, 'dateTime')}{b.pointLabel ? ` · point ${b.pointLabel}` : ''}{b.status === 'waitlisted' && b.position ? ` · number ${b.position} on the waitlist` : ''}</span>
                {b.sessionCancelled ? <span className="ml-1 font-medium text-stop-700">(class cancelled)</span> : null}
              </span>
              <PlaceBadge status={b.status} />
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
