import { button, esc, page, paragraph, textFooter, when, type RenderedMail } from './layout';

/** A student's sign-in link (PRODUCT.md §11): e-mailed through the outbox, good once, until `expires`. */
export function signInLinkMessage(i: { studioName: string; timeZone: string; url: string; expires: Date }): RenderedMail {
  const subject = `Your sign-in link for ${i.studioName}`;
  const lead = 'Use this link to sign in to your bookings. It works once.';
  const until = `It works until ${when(i.expires, i.timeZone)}. If you did not ask for it, ignore this e-mail: nobody can sign in without the link.`;
  const text = [lead, '', i.url, '', until, ...textFooter(i.studioName, false)].join('\n');
  const html = page({
    title: subject,
    studioName: i.studioName,
    body: [paragraph(lead), button(i.url, 'Sign in'), `<p style="margin:0 0 12px;font-size:13px;color:#56666a;word-break:break-all;">${esc(i.url)}</p>`, paragraph(until, { muted: true })].join(''),
  });
  return { subject, text, html };
}
