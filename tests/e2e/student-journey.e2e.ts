import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiCall, axeFor, createFabricPoint, DESKTOP, openBrowser, PHONE, shot, shotScreen, signInAs, uniqueTag } from './browser';

/*
 * The student's journey on a phone (PRODUCT.md §11) at 390 × 844: the public timetable signed out,
 * "e-mail me a link", the link read from the built-in mail catcher, book a class, see it, sign the
 * waiver, make a calendar link, cancel. A class of its own in a room of its own, two days ahead (so
 * the 12-hour cut-off never bites), and a student of its own. No console error; axe finds nothing
 * serious or critical on any page visited.
 */

const baseUrl = inject('baseUrl');
const tag = uniqueTag();
const email = `student-${tag.toLowerCase()}@loftwise.test`;
const fullName = `Robin Student ${tag}`;
let staff: BrowserContext;
let phone: BrowserContext;
let owner: Page;
let page: Page;
let className = '';
const consoleErrors: string[] = [];
const axeFindings: string[] = [];

/**
 * Toasts sit over the top of a phone screen for a few seconds, and a pointer resting on one keeps it
 * there: move the pointer off and wait until they have gone.
 */
async function toastsGone(p: Page) {
  await p.mouse.move(5, PHONE.height - 5);
  for (let i = 0; i < 60 && (await p.locator('[data-sonner-toast]').count()) > 0; i++) await p.waitForTimeout(250);
}

async function axe(p: Page) {
  // Toasts come and go (sonner's own colours); the page is checked once they have gone.
  await toastsGone(p);
  const { violations } = await axeFor(p).analyze();
  for (const v of violations) if (v.impact === 'serious' || v.impact === 'critical') axeFindings.push(`${new URL(p.url()).pathname}: ${v.id} (${v.impact}) ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
}

beforeAll(async () => {
  staff = await openBrowser(DESKTOP);
  const rigger = await staff.newPage();
  await signInAs(rigger, baseUrl, 'rigger@loftwise.test');
  const roomId = (await apiCall<{ id: number }>(rigger, baseUrl, 'POST', '/rooms', { name: `Student Room ${tag}` })).id;
  const pointId = await createFabricPoint(rigger, baseUrl, { roomId, label: `ST-${tag}` });
  await rigger.close();

  const desk = await staff.newPage();
  await signInAs(desk, baseUrl, 'reception@loftwise.test');
  // A class type of its own, so the timetable row and the booking are unmistakably this test's.
  const type = await apiCall<{ id: number; name: string }>(desk, baseUrl, 'POST', '/class-types', { name: `Silks ${tag}`, apparatus: 'fabric', durationMinutes: 60, capacity: 4, performersPerPoint: 1 });
  className = type.name;
  const users = await apiCall<Array<{ id: number; role: string; active: boolean }>>(desk, baseUrl, 'GET', '/users');
  // Two days ahead at the top of an hour, with whichever instructor is free then.
  const start = Math.ceil((Date.now() + 2 * 86_400_000) / 3_600_000) * 3_600_000;
  let booked = false;
  for (const u of users.filter((x) => x.role === 'instructor' && x.active)) {
    try {
      await apiCall(desk, baseUrl, 'POST', '/sessions', { classTypeId: type.id, instructorId: u.id, roomId, pointIds: [pointId], startsAt: new Date(start).toISOString(), endsAt: new Date(start + 3_600_000).toISOString() });
      booked = true;
      break;
    } catch {
      /* teaching then: try the next one */
    }
  }
  if (!booked) throw new Error('no instructor was free for the student journey class');
  await apiCall(desk, baseUrl, 'POST', '/students', { name: fullName, email });
  await desk.close();

  owner = await staff.newPage();
  await signInAs(owner, baseUrl, 'owner@loftwise.test');
  const waivers = await apiCall<{ current: unknown }>(owner, baseUrl, 'GET', '/waivers');
  if (!waivers.current) await apiCall(owner, baseUrl, 'POST', '/waivers', { text: 'I take part in aerial classes at my own risk, tell the instructor of any injury, and follow their instructions at all times.' });

  phone = await openBrowser(PHONE);
  page = await phone.newPage();
  page.on('console', (m) => { if (m.type() === 'error') consoleErrors.push(`${page.url()}: ${m.text()}`); });
  page.on('pageerror', (e) => consoleErrors.push(`${page.url()}: ${e.message}`));
}, 120_000);

afterAll(async () => {
  await phone?.close();
  await staff?.close();
});

/** The sign-in link the built-in catcher received for the student (the mail worker runs every `outboxIntervalMs`, tests/e2e/global-setup.ts). */
async function linkFromMailbox(): Promise<string> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const all = await apiCall<Array<{ to: string[]; subject: string; text: string }>>(owner, baseUrl, 'GET', '/dev/mailbox');
    const mine = all.find((m) => m.to.includes(email) && /sign-in link/i.test(m.subject));
    const link = mine?.text.match(/https?:\/\/\S+\/auth\/callback\/nodemailer\?\S+/)?.[0];
    if (link) return link;
    if (Date.now() > deadline) throw new Error('no sign-in link reached the mailbox');
    await new Promise((r) => setTimeout(r, 1000));
  }
}

describe('a student books, signs the waiver and cancels on a phone', () => {
  it('signs in by the e-mailed link from the public timetable', async () => {
    await page.goto(`${baseUrl}/timetable?week=0`);
    await page.getByRole('heading', { name: 'Timetable' }).waitFor();
    await page.getByTestId('timetable-class').first().waitFor();
    await shot(page, 'student-timetable-signed-out');
    await axe(page);
    // Book leads to sign-in.
    await page.getByRole('link', { name: new RegExp(`^Book ${className}`) }).first().click();
    await page.getByLabel('Your e-mail').waitFor();
    await page.getByLabel('Your e-mail').fill(email);
    await shot(page, 'student-sign-in');
    await axe(page);
    await page.getByRole('button', { name: 'E-mail me a link' }).click();
    await page.getByRole('heading', { name: 'Check your e-mail' }).waitFor();
    await shot(page, 'student-check-email');
    await axe(page);

    const link = await linkFromMailbox();
    await page.goto(link);
    await page.getByRole('navigation', { name: 'Your pages' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/timetable');
  }, 90_000);

  it('books the class with a confirmation and sees the booking', async () => {
    const row = page.getByTestId('timetable-class').filter({ hasText: className }).filter({ has: page.getByRole('button', { name: /^Book / }) });
    // Our class is two days ahead: this week's page or the next (once the list has loaded).
    await page.getByTestId('timetable-class').first().waitFor();
    if (!(await page.getByRole('button', { name: new RegExp(`^Book ${className}`) }).count())) await page.getByRole('button', { name: 'Later week' }).click();
    const book = page.getByRole('button', { name: new RegExp(`^Book ${className}`) }).first();
    await book.waitFor();
    await book.click();
    const dialog = page.getByRole('dialog', { name: 'Book this class?' });
    await dialog.waitFor();
    await shotScreen(page, 'student-book-confirm');
    const confirm = dialog.getByRole('button', { name: 'Book my place' });
    await confirm.click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByText(`Booked: ${className}.`).waitFor();
    expect(await row.count()).toBeGreaterThan(0);

    await page.getByRole('link', { name: 'My bookings', exact: true }).click();
    const mine = page.getByTestId('my-booking').filter({ hasText: className });
    await mine.first().waitFor();
    expect(await mine.first().innerText()).toContain('Booked');
    await page.getByText('You have no valid waiver yet.').waitFor();
    await shot(page, 'student-my-bookings');
    await axe(page);
  });

  it('signs the waiver by typing the full name', async () => {
    await toastsGone(page);
    await page.getByRole('link', { name: 'Waiver', exact: true }).click();
    await page.getByLabel('Type your full name to sign').fill(fullName);
    await shot(page, 'student-waiver');
    await axe(page);
    const sign = page.getByRole('button', { name: 'Sign the waiver' });
    await sign.click();
    await page.getByText(/^Signed \(version \d+\)/).waitFor();
    await shot(page, 'student-waiver-signed');
  });

  it('makes a calendar link on the account page', async () => {
    await toastsGone(page);
    await page.getByRole('link', { name: 'Account', exact: true }).click();
    await page.getByRole('button', { name: 'Make my calendar link' }).click();
    const url = await page.getByTestId('feed-url').inputValue();
    expect(url).toMatch(/\/ical\/[A-Za-z0-9_-]+\.ics$/);
    const feed = await page.request.get(url);
    expect(feed.status()).toBe(200);
    expect(await feed.text()).toContain(className);
    await shot(page, 'student-account');
    await axe(page);
  });

  it('cancels the booking after confirming', async () => {
    await toastsGone(page);
    await page.getByRole('link', { name: 'My bookings', exact: true }).click();
    const mine = page.getByTestId('my-booking').filter({ hasText: className }).first();
    await mine.getByRole('button', { name: /^Cancel / }).click();
    const dialog = page.getByRole('dialog', { name: 'Cancel this booking?' });
    await dialog.waitFor();
    await shotScreen(page, 'student-cancel-confirm');
    await dialog.getByRole('button', { name: 'Cancel my place' }).click();
    await dialog.waitFor({ state: 'hidden' });
    await page.getByText(`Cancelled: ${className}.`).waitFor();
    await page.getByRole('heading', { name: 'Past and cancelled' }).waitFor();
    await shot(page, 'student-cancelled');
  });

  it('never shows a student a staff page', async () => {
    await page.goto(`${baseUrl}/schedule`);
    await page.waitForURL(/\/my\/bookings$/);
  });

  it('left no console error and nothing serious or critical for axe', () => {
    expect(consoleErrors).toEqual([]);
    expect(axeFindings).toEqual([]);
  });
});
