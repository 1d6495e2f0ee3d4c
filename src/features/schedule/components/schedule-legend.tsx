import { sessionStates, stateLook } from '../session-state';

/** What each state means, with the same word, icon and colour as the calendar. */
export function ScheduleLegend() {
  return (
    <section aria-labelledby="legend-title" className="rounded-xl border border-line bg-white p-4">
      <h2 id="legend-title" className="mb-2 text-sm font-semibold">Legend</h2>
      <ul className="grid gap-2 sm:grid-cols-2 xl:grid-cols-5">
        {sessionStates.map((s) => {
          const { label, meaning, Icon, event } = stateLook[s];
          return (
            <li key={s} className="flex items-start gap-2 text-sm">
              <span className="mt-0.5 flex size-6 shrink-0 items-center justify-center rounded border-l-4" style={{ background: event.bg, borderColor: event.border, color: event.text }}>
                <Icon className="size-4" aria-hidden />
              </span>
              <span>
                <span className="font-medium">{label}</span>
                <span className="block text-xs text-muted">{meaning}</span>
              </span>
            </li>
          );
        })}
      </ul>
      <p className="mt-2 text-xs text-muted">“3 of 8 places usable”: one usable place per booked point that is not blocked at the class’s time, up to the class’s capacity (8). It does not count students booked.</p>
    </section>
  );
}
