import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiCall, createFabricPoint, DESKTOP, openBrowser, PHONE, shot, signInAs, studioDate } from './browser';

/*
 * Who hears of a fault (issue 14; JOURNEYS.md Instructor 3, Owner 4): an instructor on a phone
 * reports faults from the QR-label form; the owner reads what went out in the Mailbox. One fault
 * under a weekly class is one at-risk e-mail per recipient, not one per date; a fault on a point
 * with no booked class still reaches the riggers. The server's mail worker runs every
 * `outboxIntervalMs` (2 s in these tests, tests/e2e/global-setup.ts).
 */

const baseUrl = inject('baseUrl');
const ROOM = 'Alert Walk Loft';
const CLASS = 'Silks Foundations';
const INSTRUCTOR = 'Ines Albrecht';

let rigger: BrowserContext;
let phone: BrowserContext;
let owner: BrowserContext;
let riggerPage: Page;
let instructorPage: Page;
let ownerPage: Page;
const points: Record<string, number> = {};
const consoleErrors: string[] = [];

interface Caught { to: string[]; subject: string; text: string }

beforeAll(async () => {
  rigger = await openBrowser(DESKTOP);
  riggerPage = await rigger.newPage();
  await signInAs(riggerPage, baseUrl, 'rigger@loftwise.test');
  const roomId = (await apiCall<{ id: number }>(riggerPage, baseUrl, 'POST', '/rooms', { name: ROOM })).id;
  for (const label of ['AW-1', 'AW-2']) points[label] = await createFabricPoint(riggerPage, baseUrl, { roomId, label });

  owner = await openBrowser(DESKTOP);
  ownerPage = await owner.newPage();
  await signInAs(ownerPage, baseUrl, 'owner@loftwise.test');
  // A weekly class of four on AW-1, booked by the desk (the owner may book too).
  const classTypeId = (await apiCall<Array<{ id: number; name: string }>>(ownerPage, baseUrl, 'GET', '/class-types')).find((c) => c.name === CLASS)!.id;
  const instructorId = (await apiCall<Array<{ id: number; name: string }>>(ownerPage, baseUrl, 'GET', '/instructors')).find((u) => u.name === INSTRUCTOR)!.id;
  const first = studioDate(12);
  await apiCall(ownerPage, baseUrl, 'POST', '/sessions', { classTypeId, instructorId, roomId, pointIds: [points['AW-1']], startsAt: `${first}T06:00:00Z`, endsAt: `${first}T07:00:00Z`, rrule: 'FREQ=WEEKLY;COUNT=4' });

  phone = await openBrowser(PHONE);
  instructorPage = await phone.newPage();
  for (const p of [instructorPage, ownerPage]) {
    p.on('console', (m) => { if (m.type() === 'error') consoleErrors.push(`${p.url()}: ${m.text()}`); });
    p.on('pageerror', (e) => consoleErrors.push(`${p.url()}: ${e.message}`));
  }
  await signInAs(instructorPage, baseUrl, 'instructor@loftwise.test');
}, 90_000);
afterAll(async () => {
  await Promise.all([rigger?.close(), phone?.close(), owner?.close()]);
});

async function reportFault(pointId: number, severity: RegExp, description: string) {
  await instructorPage.goto(`${baseUrl}/faults/new?pointId=${pointId}`);
  const form = instructorPage.getByRole('form', { name: 'Report a fault' });
  await form.waitFor();
  await form.getByRole('radio', { name: severity }).check();
  await form.getByLabel('What is wrong?').fill(description);
  await form.getByRole('button', { name: 'Report the fault' }).click();
  await instructorPage.getByRole('status').filter({ hasText: 'Fault reported' }).first().waitFor();
}

/** The mailbox as the owner's API reads it, polled until `ready` holds (the worker runs every `outboxIntervalMs`). */
async function mailboxUntil(ready: (all: Caught[]) => boolean): Promise<Caught[]> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const all = await apiCall<Caught[]>(ownerPage, baseUrl, 'GET', '/dev/mailbox');
    if (ready(all) || Date.now() > deadline) return all;
    await new Promise((r) => setTimeout(r, 1000));
  }
}

describe('who hears of a fault', () => {
  it('sends one at-risk e-mail per recipient for one fault under a weekly class, listing its four dates', async () => {
    await reportFault(points['AW-1'], /^Medium\b/, 'Sling sheath cut near the clamp');
    const about = (all: Caught[]) => all.filter((m) => m.subject.startsWith('At risk') && m.subject.includes(ROOM));
    const all = await mailboxUntil((m) => about(m).length > 0);
    // Two more cycles, so a message per date would have had time to arrive.
    await new Promise((r) => setTimeout(r, 2 * inject('outboxIntervalMs') + 1_000));
    const alerts = about(await apiCall<Caught[]>(ownerPage, baseUrl, 'GET', '/dev/mailbox'));
    expect(all.length).toBeGreaterThan(0);
    expect(alerts).toHaveLength(1);
    expect(alerts[0].subject).toMatch(new RegExp(`^At risk: ${CLASS} in ${ROOM}, 4 classes from `));
    const recipients = alerts.flatMap((m) => m.to);
    expect(recipients).toContain('reception@loftwise.test');
    expect(recipients).toContain('rigger@loftwise.test');
    expect(new Set(recipients).size).toBe(recipients.length);
    expect(alerts[0].text.match(/Sling sheath cut near the clamp/g)).toHaveLength(1);
  }, 120_000);

  it('tells the riggers of a fault on a point with no booked class', async () => {
    await reportFault(points['AW-2'], /^Low\b/, 'Beam paint flaking above the point');
    const notices = (all: Caught[]) => all.filter((m) => m.subject.startsWith('Fault') && m.subject.includes('AW-2'));
    const found = notices(await mailboxUntil((m) => notices(m).length > 0));
    expect(found).toHaveLength(1);
    expect(found[0].to).toContain('rigger@loftwise.test');
    expect(found[0].to).not.toContain('reception@loftwise.test');
    expect(found[0].text).toContain('No booked class uses this point');

    await ownerPage.goto(`${baseUrl}/mailbox`);
    await ownerPage.getByText(found[0].subject).first().waitFor();
    await shot(ownerPage, 'owner-mailbox-alerts');
  }, 120_000);

  it('showed no console error on any of these pages', () => {
    expect(consoleErrors).toEqual([]);
  });
});
