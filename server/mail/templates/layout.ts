import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import type { PointStatusWord } from '../../../shared/schemas/vocabulary';
import { formatStudioDateTime } from '../../../shared/clearance';

/** What every template returns: one message, ready for the outbox. */
export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

/** Every value that reaches HTML goes through here. */
export function esc(value: unknown): string {
  return String(value ?? '')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/** Subjects and plain text carry no markup, but must not carry line breaks into a header either. */
export function oneLine(value: string): string {
  return value.replace(/[\r\n]+/g, ' ').trim();
}

// A calm palette of our own; status is always a word and a symbol as well as a colour.
const c = {
  page: '#f4f2ee',
  card: '#ffffff',
  ink: '#1f2b2d',
  muted: '#56666a',
  line: '#e3ded6',
  accent: '#2c6b66',
};
const statusLook: Record<PointStatusWord, { symbol: string; fg: string; bg: string }> = {
  cleared: { symbol: '✓', fg: '#24593a', bg: '#e4f0e7' },
  expiring: { symbol: '!', fg: '#7a4d00', bg: '#fbefd5' },
  blocked: { symbol: '✕', fg: '#8e2626', bg: '#f7e1df' },
};

const font = "font-family:Lexend,'Segoe UI',Helvetica,Arial,sans-serif;";

export function when(instant: Date | string, timeZone: string): string {
  return formatStudioDateTime(new Date(instant), timeZone);
}

/** "18:00" in the studio's zone. */
export function clockTime(instant: Date | string, timeZone: string): string {
  return format(new TZDate(new Date(instant).getTime(), timeZone), 'HH:mm');
}

/** "Thu 3 Dec" in the studio's zone. */
export function shortDay(instant: Date | string, timeZone: string): string {
  return format(new TZDate(new Date(instant).getTime(), timeZone), 'EEE d MMM');
}

/** "3 Dec 2026, 18:00 to 19:30", or both dates when the session crosses midnight. */
export function timeRange(startsAt: Date | string, endsAt: Date | string, timeZone: string): string {
  const start = when(startsAt, timeZone);
  const end = when(endsAt, timeZone);
  return start.slice(0, -7) === end.slice(0, -7) ? `${start} to ${clockTime(endsAt, timeZone)}` : `${start} to ${end}`;
}

export const CAUTION =
  'Statuses come from the inspections recorded and the rules configured in Loftwise. They do not replace your own pre-use check, inspection by a qualified rigger, the maker’s instructions, an engineer’s assessment of the structure, or local codes.';

export function statusBadge(status: PointStatusWord): string {
  const s = statusLook[status];
  return `<span style="display:inline-block;padding:2px 10px;border-radius:999px;background:${s.bg};color:${s.fg};font-weight:600;font-size:14px;white-space:nowrap;">${s.symbol} ${esc(status)}</span>`;
}

export function heading(text: string): string {
  return `<h2 style="margin:24px 0 8px;font-size:17px;line-height:1.3;color:${c.ink};">${esc(text)}</h2>`;
}

export function paragraph(text: string, opts: { muted?: boolean } = {}): string {
  return `<p style="margin:0 0 12px;font-size:16px;line-height:1.5;color:${opts.muted ? c.muted : c.ink};">${esc(text)}</p>`;
}

/** Label/value rows, e.g. class, room, time. */
export function facts(rows: Array<[string, string]>): string {
  const cells = rows
    .map(
      ([k, v]) =>
        `<tr><td style="padding:4px 12px 4px 0;vertical-align:top;color:${c.muted};font-size:15px;white-space:nowrap;">${esc(k)}</td><td style="padding:4px 0;vertical-align:top;color:${c.ink};font-size:16px;">${esc(v)}</td></tr>`,
    )
    .join('');
  return `<table role="presentation" cellpadding="0" cellspacing="0" style="border-collapse:collapse;margin:0 0 8px;">${cells}</table>`;
}

/** A list of items, each a bold line, an optional badge and muted detail lines. */
export function itemList(items: Array<{ title: string; status?: PointStatusWord; details?: string[] }>): string {
  if (!items.length) return '';
  const li = items
    .map((i) => {
      const details = (i.details ?? []).map((d) => `<div style="margin-top:4px;font-size:15px;line-height:1.45;color:${c.muted};">${esc(d)}</div>`).join('');
      const badge = i.status ? ` ${statusBadge(i.status)}` : '';
      return `<li style="margin:0;padding:12px 0;border-top:1px solid ${c.line};list-style:none;"><div style="font-size:16px;font-weight:600;color:${c.ink};">${esc(i.title)}${badge}</div>${details}</li>`;
    })
    .join('');
  return `<ul style="margin:0 0 8px;padding:0;">${li}</ul>`;
}

export function button(href: string, label: string): string {
  return `<p style="margin:20px 0 8px;"><a href="${esc(href)}" style="display:inline-block;padding:12px 20px;border-radius:8px;background:${c.accent};color:#ffffff;font-size:16px;font-weight:600;text-decoration:none;">${esc(label)}</a></p>`;
}

/** The whole message: one narrow card that reads on a phone. No images, no remote resources, no tracking. */
export function page(opts: { title: string; studioName: string; body: string; caution?: boolean }): string {
  const caution = opts.caution ? `<p style="margin:16px 0 0;font-size:13px;line-height:1.5;color:${c.muted};">${esc(CAUTION)}</p>` : '';
  return [
    '<!doctype html>',
    '<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${esc(opts.title)}</title></head>`,
    `<body style="margin:0;padding:0;background:${c.page};${font}">`,
    `<div style="max-width:560px;margin:0 auto;padding:16px;">`,
    `<div style="padding:4px 4px 12px;font-size:14px;color:${c.muted};">Loftwise · ${esc(opts.studioName)}</div>`,
    `<div style="background:${c.card};border:1px solid ${c.line};border-radius:12px;padding:20px;">`,
    `<h1 style="margin:0 0 12px;font-size:21px;line-height:1.3;color:${c.ink};">${esc(opts.title)}</h1>`,
    opts.body,
    caution,
    '</div>',
    `<div style="padding:12px 4px;font-size:13px;color:${c.muted};">Sent by Loftwise for ${esc(opts.studioName)}.</div>`,
    '</div></body></html>',
  ].join('');
}

/** Plain-text footer lines shared by every message. */
export function textFooter(studioName: string, caution = false): string[] {
  return ['', ...(caution ? [CAUTION, ''] : []), `Sent by Loftwise for ${studioName}.`];
}
