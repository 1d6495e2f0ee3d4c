import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Locator, Page } from 'playwright-core';
import { apiCall, createFabricPoint, DEMO_PASSWORD, DESKTOP, openBrowser, shot, shotScreen, signInAs, studioDate, uniqueTag, pageErrors, withoutRefusals } from './browser';

/*
 * The reception journey (JOURNEYS.md, Reception 1–3; PRODUCT.md §4.4) on the desk's screen, in a
 * room of its own: the other browser tests share this server and database, so everything these
 * tests book or fault hangs in "Schedule Test Loft" and nowhere else.
 *
 *   SE-1, SE-2  cleared, booked by the weekly class of the first test
 *   SE-3        a load path but never cleared: greyed until the rigger clears it (second test)
 *   SE-4        cleared and free: the replacement when SE-1 gets a fault (third test)
 */

const baseUrl = inject('baseUrl');
const ROOM = 'Schedule Test Loft';
const CLASS = 'Silks Foundations'; // a demo class type: fabric, 60 min, one performer per point
const INSTRUCTOR = 'Ines Albrecht'; // instructor@loftwise.test
const START = '08:00'; // before any demo class, so the instructor is free
const WEEKS = 3;
const seriesDay = studioDate(2);
const singleDay = studioDate(3);

let reception: BrowserContext;
let rigger: BrowserContext;
let desk: Page;
let riggerPage: Page;
let roomId = 0;
const pointIds: Record<string, number> = {};

async function buildRig(page: Page) {
  roomId = (await apiCall<{ id: number }>(page, baseUrl, 'POST', '/rooms', { name: ROOM })).id;
  for (const n of [1, 2, 3, 4]) pointIds[`SE-${n}`] = await createFabricPoint(page, baseUrl, { roomId, label: `SE-${n}`, clear: n !== 3 });
}

beforeAll(async () => {
  rigger = await openBrowser(DESKTOP);
  riggerPage = await rigger.newPage();
  await signInAs(riggerPage, baseUrl, 'rigger@loftwise.test');
  await buildRig(riggerPage);
  reception = await openBrowser(DESKTOP);
  desk = await reception.newPage();
  await signInAs(desk, baseUrl, 'reception@loftwise.test');
});
afterAll(async () => {
  await reception?.close();
  await rigger?.close();
});

// ---- the desk's moves, as a person makes them

async function openSchedule(page: Page) {
  await page.goto(`${baseUrl}/schedule`);
  await page.getByRole('heading', { name: 'Schedule', level: 1 }).waitFor();
  // Only this room's classes, so demo classes never get in the way.
  await page.getByRole('search', { name: 'Filter the schedule' }).getByLabel('Room').selectOption({ label: ROOM });
}

const agenda = (page: Page) => page.getByRole('region', { name: /^Agenda/ });
const calendarEvents = (page: Page) => page.locator('.fc-event').filter({ hasText: ROOM });
/** The agenda's button for this room's class on a studio day (long day heading, then the item). */
const agendaItemOn = (page: Page, day: string) => agenda(page).getByRole('listitem').filter({ has: page.getByRole('heading', { name: longDay(day) }) }).getByRole('button').filter({ hasText: ROOM });

/** 'YYYY-MM-DD' + n days (fixed from the first day, so a run across midnight keeps the same dates). */
function plusDays(day: string, n: number) {
  return new Date(Date.parse(`${day}T12:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);
}

function longDay(day: string) {
  // The agenda heads each day "Thursday 3 December 2026" (en-GB, the studio's zone).
  const d = new Date(`${day}T12:00:00Z`);
  const part = (o: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', ...o }).format(d);
  return new RegExp(`^${part({ weekday: 'long' })},? ${d.getUTCDate()} ${part({ month: 'long' })} ${d.getUTCFullYear()}$`);
}

/** Steps the calendar forward a week at a time until this room's class on `day` is in view. */
async function showWeekOf(page: Page, day: string) {
  for (let i = 0; i < 6; i++) {
    await waitForAgenda(page);
    if (await agendaItemOn(page, day).count()) return;
    await page.getByRole('button', { name: 'Next ›' }).click();
  }
  throw new Error(`no class on ${day} came into view`);
}

async function waitForAgenda(page: Page) {
  await expect.poll(() => agenda(page).getByText('Loading classes…').count()).toBe(0);
}

async function openBookingDialog(page: Page, day: string, repeatWeekly: boolean): Promise<Locator> {
  await page.getByRole('button', { name: 'Book a class' }).click();
  const dialog = page.getByRole('dialog', { name: 'Book a class' });
  await dialog.waitFor();
  await dialog.getByLabel('Class type').selectOption({ label: CLASS });
  await dialog.getByLabel('Instructor').selectOption({ label: INSTRUCTOR });
  await dialog.getByLabel('Room').selectOption({ label: ROOM });
  if (repeatWeekly) {
    await choose(dialog, 'Weekly');
    await choose(dialog, 'After a number of classes');
    await dialog.getByRole('spinbutton', { name: 'Number of classes' }).fill(String(WEEKS));
  }
  await dialog.getByLabel(repeatWeekly ? 'First day' : 'Day').fill(day);
  await dialog.getByLabel('Starts').fill(START);
  await expect.poll(() => dialog.getByLabel('Ends').inputValue()).toBe('09:00');
  // Every point of the room is listed for that time, bookable or not.
  await pointRow(dialog, 'SE-4').waitFor();
  return dialog;
}

/** The choice buttons are labels over visually hidden radios: click the label, as a person does. */
async function choose(scope: Locator, name: string) {
  await scope.locator('label').filter({ has: scope.page().getByRole('radio', { name, exact: true }) }).click();
  expect(await scope.getByRole('radio', { name, exact: true }).isChecked()).toBe(true);
}

const pointRow = (dialog: Locator, label: string) => dialog.getByRole('group', { name: 'Points' }).getByRole('listitem').filter({ hasText: label });
const pointBox = (dialog: Locator, label: string) => pointRow(dialog, label).getByRole('checkbox');

async function book(page: Page, dialog: Locator) {
  await dialog.getByRole('button', { name: 'Book', exact: true }).click();
  await dialog.waitFor({ state: 'hidden' });
  await page.getByText(`Booked ${CLASS}`).first().waitFor();
}

describe('reception books and fixes classes on the schedule', () => {
  it('books a weekly class on cleared points, and each class shows on the calendar and agenda as “All clear”', async () => {
    await openSchedule(desk);
    await shot(desk, 'schedule-1-week');
    const dialog = await openBookingDialog(desk, seriesDay, true);
    await expect(dialog.getByText(`${WEEKS} classes`, { exact: true }).count()).resolves.toBe(1);
    for (const label of ['SE-1', 'SE-2', 'SE-4']) {
      expect(await pointRow(dialog, label).innerText()).toContain('Can take this class');
      expect(await pointBox(dialog, label).isEnabled()).toBe(true);
    }
    await pointBox(dialog, 'SE-1').check();
    await pointBox(dialog, 'SE-2').check();
    await expect(dialog.getByText('2 ticked').count()).resolves.toBe(1);
    await shotScreen(desk, 'schedule-1-booking-weekly');
    await book(desk, dialog);
    expect(await desk.getByText(`and ${WEEKS - 1} more`).count()).toBeGreaterThan(0);

    // The calendar jumps to the first class; each following week holds the next one.
    for (let week = 0; week < WEEKS; week++) {
      const day = plusDays(seriesDay, 7 * week);
      await showWeekOf(desk, day);
      const item = agendaItemOn(desk, day);
      await expect(item.innerText()).resolves.toMatch(new RegExp(`08:00.*09:00[\\s\\S]*${CLASS}[\\s\\S]*All clear`));
      const event = calendarEvents(desk).filter({ hasText: CLASS });
      await event.first().waitFor();
      expect(await event.first().innerText()).toContain('All clear');
      if (week === 0) await shot(desk, 'schedule-1-booked');
    }
  });

  it('shows a never-cleared point greyed with its reason, and books it once the rigger has cleared it', async () => {
    await openSchedule(desk);
    let dialog = await openBookingDialog(desk, singleDay, false);
    const row = pointRow(dialog, 'SE-3');
    expect(await pointBox(dialog, 'SE-3').isDisabled()).toBe(true);
    const why = await row.innerText();
    expect(why).toContain('Cannot take this class');
    expect(why).toContain('Point SE-3 has never been cleared by a rigger');
    await expect(dialog.getByText(/3 of 4 can take this class/).count()).resolves.toBe(1);
    await shotScreen(desk, 'schedule-2-lapsed-greyed');
    await dialog.getByRole('button', { name: 'Close' }).first().click();
    // What was typed is thrown away only when the desk says so.
    await desk.getByRole('dialog', { name: 'Discard this booking?' }).getByRole('button', { name: 'Discard what I typed' }).click();
    await dialog.waitFor({ state: 'hidden' });

    // The rigger inspects SE-3 on the Inspections page and signs it off.
    await riggerPage.goto(`${baseUrl}/inspections?point=${pointIds['SE-3']}`);
    await riggerPage.getByRole('heading', { name: /Inspect SE-3/ }).waitFor();
    await riggerPage.getByRole('button', { name: 'Mark all pass' }).click();
    await riggerPage.getByRole('button', { name: 'Sign the inspection' }).click();
    await riggerPage.getByText('SE-3 is cleared.').first().waitFor();
    await shot(riggerPage, 'schedule-2-rigger-cleared');

    dialog = await openBookingDialog(desk, singleDay, false);
    await expect.poll(() => pointRow(dialog, 'SE-3').innerText()).toContain('Can take this class');
    expect(await pointRow(dialog, 'SE-3').innerText()).not.toContain('never been cleared');
    await pointBox(dialog, 'SE-3').check();
    await shotScreen(desk, 'schedule-2-now-bookable');
    await book(desk, dialog);
    await showWeekOf(desk, singleDay);
    const item = agendaItemOn(desk, singleDay);
    await expect(item.innerText()).resolves.toContain('All clear');
    await item.click();
    const drawer = desk.getByRole('dialog', { name: CLASS });
    await drawer.getByRole('region', { name: 'Booked points' }).getByRole('link', { name: 'Point SE-3' }).waitFor();
    await drawer.getByRole('button', { name: 'Close' }).click();
  });

  it('turns a class “At risk” with the reason when a booked point gets a fault, and one swap makes it calm again', async () => {
    // The instructor reports a fault on SE-1 (as from the Today board).
    const instructor = await openBrowser(DESKTOP);
    try {
      const page = await instructor.newPage();
      await signInAs(page, baseUrl, 'instructor@loftwise.test');
      await apiCall(page, baseUrl, 'POST', '/faults', { pointId: pointIds['SE-1'], severity: 'medium', description: 'Swivel grinds when turned' });
    } finally {
      await instructor.close();
    }

    await openSchedule(desk);
    await showWeekOf(desk, seriesDay);
    const item = agendaItemOn(desk, seriesDay);
    await expect.poll(() => item.innerText()).toContain('At risk');
    expect(await item.innerText()).toContain('Swivel grinds when turned');
    const event = calendarEvents(desk).filter({ hasText: 'At risk' }).first();
    expect(await event.innerText()).toMatch(/At risk[\s\S]*Open fault[\s\S]*Swivel grinds when turned/);
    const summary = desk.getByRole('region', { name: /class(es)? at risk in this range/ });
    expect(await summary.innerText()).toContain(ROOM);
    await shot(desk, 'schedule-3-at-risk');

    await item.click();
    const drawer = desk.getByRole('dialog', { name: CLASS });
    await drawer.getByRole('alert').filter({ hasText: 'At risk' }).waitFor();
    expect(await drawer.getByRole('alert').filter({ hasText: 'At risk' }).innerText()).toContain('Swivel grinds when turned');
    const suggestions = drawer.getByRole('region', { name: 'Suggested replacements' });
    const swapButtons = suggestions.getByRole('button', { name: /^Swap in point .* for point SE-1$/ });
    await swapButtons.first().waitFor();
    // Same room first: SE-3 and SE-4 are free at that hour; points elsewhere are listed apart.
    const sameRoom = (await suggestions.getByRole('listitem').filter({ has: desk.getByRole('button') }).allInnerTexts()).map((t) => t.split('\n')[0]);
    expect(sameRoom.slice(0, 2).every((t) => t.includes(ROOM))).toBe(true);
    expect(sameRoom.join(' ')).toContain('Point SE-4');
    await shotScreen(desk, 'schedule-3-suggestions');

    // The suggestions are re-read after the swap; answered last (as on a busy server), they once took
    // the desk's confirmation with them when the calm class closed the panel.
    await desk.route('**/api/sessions/*/alternatives', async (route) => {
      await new Promise((r) => setTimeout(r, 1500));
      await route.continue();
    });
    await suggestions.getByRole('button', { name: 'Swap in point SE-4 for point SE-1' }).click();
    await expect.poll(() => drawer.innerText(), { timeout: 20_000 }).toContain('Swapped SE-1 → SE-4');
    await desk.unroute('**/api/sessions/*/alternatives');
    expect(await drawer.getByRole('status').filter({ hasText: /\S/ }).innerText()).toContain('The class is all clear.');
    await expect.poll(() => drawer.getByText('All clear', { exact: true }).count()).toBeGreaterThan(0);
    expect(await drawer.getByRole('alert').filter({ hasText: 'At risk' }).count()).toBe(0);
    const booked = (await drawer.getByRole('region', { name: 'Booked points' }).getByRole('link').allInnerTexts()).sort();
    expect(booked).toEqual(['Point SE-2', 'Point SE-4']);
    await shotScreen(desk, 'schedule-3-swapped');
    await drawer.getByRole('button', { name: 'Close' }).click();

    await expect.poll(() => agendaItemOn(desk, seriesDay).innerText()).toContain('All clear');
    await expect.poll(() => calendarEvents(desk).filter({ hasText: 'All clear' }).count()).toBeGreaterThan(0);
    await shot(desk, 'schedule-3-calm');
  });
});

describe('reception moves an at-risk class to another room', () => {
  // Rooms of its own: a one-point loft whose point gets a fault, and an annex with a free cleared point.
  const LOFT = 'Schedule Move Loft';
  const ANNEX = 'Schedule Move Annex';
  const moveDay = studioDate(5);

  /** The instant of a wall-clock time on a studio day in London (the demo studio's zone). */
  function londonInstant(day: string, time: string) {
    const guess = new Date(`${day}T${time}:00Z`);
    const hour = Number(new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hour: '2-digit', hourCycle: 'h23' }).format(guess));
    return new Date(guess.getTime() - (hour - guess.getUTCHours()) * 3_600_000).toISOString();
  }

  it('offers a free point in another room, says the class changes room, and moves it there: calm, in the new room', async () => {
    const loftId = (await apiCall<{ id: number }>(riggerPage, baseUrl, 'POST', '/rooms', { name: LOFT })).id;
    const annexId = (await apiCall<{ id: number }>(riggerPage, baseUrl, 'POST', '/rooms', { name: ANNEX })).id;
    const loftPoint = await createFabricPoint(riggerPage, baseUrl, { roomId: loftId, label: 'SM-1' });
    const annexPoint = await createFabricPoint(riggerPage, baseUrl, { roomId: annexId, label: 'SA-1' });
    const classTypeId = (await apiCall<Array<{ id: number; name: string }>>(desk, baseUrl, 'GET', '/class-types')).find((c) => c.name === CLASS)!.id;
    const instructorId = (await apiCall<Array<{ id: number; name: string }>>(desk, baseUrl, 'GET', '/users')).find((u) => u.name === INSTRUCTOR)!.id;
    const startsAt = londonInstant(moveDay, START);
    const booked = await apiCall<{ id: number }>(desk, baseUrl, 'POST', '/sessions', {
      classTypeId, instructorId, roomId: loftId, pointIds: [loftPoint], startsAt, endsAt: new Date(Date.parse(startsAt) + 3_600_000).toISOString(),
    });
    await apiCall(riggerPage, baseUrl, 'POST', '/faults', { pointId: loftPoint, severity: 'medium', description: 'Beam clamp bolt backing out' });

    await desk.goto(`${baseUrl}/schedule`);
    await desk.getByRole('heading', { name: 'Schedule', level: 1 }).waitFor();
    await desk.getByRole('search', { name: 'Filter the schedule' }).getByLabel('Room').selectOption({ label: LOFT });
    const item = agenda(desk).getByRole('listitem').filter({ has: desk.getByRole('heading', { name: longDay(moveDay) }) }).getByRole('button').filter({ hasText: LOFT });
    for (let i = 0; i < 6 && !(await item.count()); i++) {
      await desk.getByRole('button', { name: 'Next ›' }).click();
      await waitForAgenda(desk);
    }
    await expect.poll(() => item.innerText()).toContain('At risk');
    await item.click();

    const drawer = desk.getByRole('dialog', { name: CLASS });
    const suggestions = drawer.getByRole('region', { name: 'Suggested replacements' });
    // No other point hangs in the loft, so the free points are in other rooms, each a move of the class.
    await suggestions.getByText('No point in this class’s room is free.').waitFor();
    const moveButton = suggestions.getByRole('button', { name: `Move to ${ANNEX} on SA-1` });
    await moveButton.waitFor();
    await moveButton.click();

    const confirm = desk.getByRole('dialog', { name: `Move ${CLASS} to ${ANNEX}?` });
    await confirm.waitFor();
    const said = await confirm.innerText();
    expect(said).toContain(`The class changes room: from ${LOFT} to ${ANNEX}, on point SA-1`);
    expect(said).toContain('The instructor is e-mailed about the change.');
    await shotScreen(desk, 'schedule-4-move-room-confirm');
    // Nothing changes before the desk confirms.
    expect((await apiCall<{ roomId: number }>(desk, baseUrl, 'GET', `/sessions/${booked.id}`)).roomId).toBe(loftId);
    await confirm.getByRole('button', { name: `Move to ${ANNEX}` }).click();

    await expect.poll(() => drawer.getByRole('status').filter({ hasText: /\S/ }).innerText(), { timeout: 20_000 }).toContain(`Moved to ${ANNEX} on point SA-1.`);
    expect(await drawer.getByRole('status').filter({ hasText: /\S/ }).innerText()).toContain('The class is all clear.');
    await expect.poll(() => drawer.getByText('All clear', { exact: true }).count()).toBeGreaterThan(0);
    expect(await drawer.locator('dl').first().innerText()).toMatch(new RegExp(`Room\\s+${ANNEX}`));
    const points = await drawer.getByRole('region', { name: 'Booked points' }).getByRole('link').allInnerTexts();
    expect(points).toEqual(['Point SA-1']);
    await shotScreen(desk, 'schedule-4-moved-room');
    const after = await apiCall<{ roomId: number; pointIds: number[] }>(desk, baseUrl, 'GET', `/sessions/${booked.id}`);
    expect(after).toMatchObject({ roomId: annexId, pointIds: [annexPoint] });
    await drawer.getByRole('button', { name: 'Close' }).click();
  });
});

describe('an instructor filters the schedule by instructor', () => {
  it('lists every active instructor, not only those on the calendar, and no deactivated one', async () => {
    const tag = uniqueTag();
    const fresh = `Aerin Filter ${tag}`; // active, teaches nothing: never seen on any calendar
    const gone = `Bram Filter ${tag}`; // deactivated: never offered
    const owner = await openBrowser(DESKTOP);
    const instructor = await openBrowser(DESKTOP);
    const ownerPage = await owner.newPage();
    let freshId = 0;
    try {
      await signInAs(ownerPage, baseUrl, 'owner@loftwise.test');
      const make = (name: string) =>
        apiCall<{ id: number }>(ownerPage, baseUrl, 'POST', '/users', { email: `${name.replace(/\W+/g, '.').toLowerCase()}@loftwise.test`, name, role: 'instructor', password: DEMO_PASSWORD });
      freshId = (await make(fresh)).id;
      await apiCall(ownerPage, baseUrl, 'PATCH', `/users/${(await make(gone)).id}`, { active: false });
      // What the staff administration (the owner's view) says is an active instructor.
      const staff = await apiCall<Array<{ name: string; role: string; active: boolean }>>(ownerPage, baseUrl, 'GET', '/users');
      const active = staff.filter((u) => u.role === 'instructor' && u.active).map((u) => u.name).sort((a, b) => a.localeCompare(b));
      expect(active).toContain(fresh);
      expect(active).toContain(INSTRUCTOR);

      const page = await instructor.newPage();
      await signInAs(page, baseUrl, 'instructor@loftwise.test');
      await page.goto(`${baseUrl}/schedule`);
      await page.getByRole('heading', { name: 'Schedule', level: 1 }).waitFor();
      const select = page.getByRole('search', { name: 'Filter the schedule' }).getByLabel('Instructor');
      await expect.poll(() => select.locator('option').allInnerTexts()).toEqual(['All instructors', ...active]);
      expect(active).not.toContain(gone);

      // The one who teaches nothing can be chosen, and Clear filters goes back to all.
      await select.selectOption({ label: fresh });
      await expect.poll(() => select.inputValue()).toBe(String(freshId));
      await shot(page, 'schedule-4-instructor-filter');
      await page.getByRole('button', { name: 'Clear filters' }).click();
      await expect.poll(() => select.inputValue()).toBe('');
    } finally {
      // Leave the shared database's active instructors as the other files expect them.
      if (freshId) await apiCall(ownerPage, baseUrl, 'PATCH', `/users/${freshId}`, { active: false }).catch(() => undefined);
      await instructor.close();
      await owner.close();
    }
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    expect(withoutRefusals(pageErrors, [])).toEqual([]);
  });
});
