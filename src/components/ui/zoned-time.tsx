// Times as the studio reads them: every instant is shown in the studio's zone, never the browser's.

export type ZonedStyle = 'time' | 'day' | 'dateTime' | 'weekday';

const options: Record<ZonedStyle, Intl.DateTimeFormatOptions> = {
  time: { hour: '2-digit', minute: '2-digit', hourCycle: 'h23' },
  day: { day: 'numeric', month: 'short', year: 'numeric' },
  dateTime: { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' },
  weekday: { weekday: 'long', day: 'numeric', month: 'long' },
};

const cache = new Map<string, Intl.DateTimeFormat>();
function formatter(style: ZonedStyle, timeZone: string) {
  const key = `${style}|${timeZone}`;
  let f = cache.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', { timeZone, ...options[style] });
    cache.set(key, f);
  }
  return f;
}

const DAY_ONLY = /^(\d{4})-(\d{2})-(\d{2})$/;

/** An ISO instant in the studio's zone; a bare 'YYYY-MM-DD' is a calendar day and is not shifted. */
export function formatInZone(iso: string | null | undefined, timeZone: string, style: ZonedStyle = 'dateTime', fallback = '—'): string {
  if (!iso) return fallback;
  const day = DAY_ONLY.exec(iso);
  if (day) return formatter(style === 'time' ? 'day' : style, 'UTC').format(new Date(Date.UTC(Number(day[1]), Number(day[2]) - 1, Number(day[3]))));
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return formatter(style, timeZone).format(d);
}

/** The same, as a `<time>` element carrying the machine-readable instant. */
export function ZonedTime({ iso, timeZone, style = 'dateTime', fallback = '—', className }: { iso: string | null | undefined; timeZone: string; style?: ZonedStyle; fallback?: string; className?: string }) {
  if (!iso) return <span className={className}>{fallback}</span>;
  return (
    <time dateTime={iso} className={className}>
      {formatInZone(iso, timeZone, style, fallback)}
    </time>
  );
}
