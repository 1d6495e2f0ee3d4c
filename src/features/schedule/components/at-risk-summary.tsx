import { useState } from 'react';
import { TriangleAlert } from 'lucide-react';
import type { Session } from '../api';
import { whenShort } from '../format';

const FIRST = 3;

/** The at-risk classes of the visible range, first thing on the page, each opening its detail. */
export function AtRiskSummary({ sessions, timeZone, onOpen }: { sessions: Session[]; timeZone: string; onOpen: (id: number) => void }) {
  const [all, setAll] = useState(false);
  const risky = sessions.filter((s) => s.atRisk).sort((a, b) => a.startsAt.localeCompare(b.startsAt));
  if (risky.length === 0) return null;
  const listed = all ? risky : risky.slice(0, FIRST);
  return (
    <section aria-labelledby="at-risk-title" className="rounded-xl border border-stop-700/30 bg-stop-50 px-4 py-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="at-risk-title" className="flex items-center gap-2 font-semibold text-stop-700">
          <TriangleAlert className="size-5" aria-hidden />
          {risky.length === 1 ? '1 class at risk' : `${risky.length} classes at risk`} in this range
        </h2>
        {risky.length > FIRST ? (
          <button type="button" className="min-h-11 rounded-lg px-3 text-sm font-medium text-stop-700 underline-offset-2 hover:underline" aria-expanded={all} onClick={() => setAll(!all)}>
            {all ? 'Show fewer' : `Show all ${risky.length}`}
          </button>
        ) : null}
      </div>
      <ul className="mt-1">
        {listed.map((s) => (
          <li key={s.id}>
            <button type="button" onClick={() => onOpen(s.id)} className="flex min-h-11 w-full flex-wrap items-baseline gap-x-3 rounded-lg px-2 py-1.5 text-left hover:bg-white">
              <span className="font-medium text-ink">{s.className}</span>
              <span className="text-sm text-ink">{whenShort(s.startsAt, s.endsAt, timeZone)} · {s.roomName}</span>
              <span className="text-sm text-stop-700">{s.riskReasons[0]?.message}{s.riskReasons.length > 1 ? ` (+${s.riskReasons.length - 1} more)` : ''}</span>
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
}
