import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Locator, Page } from 'playwright-core';
import { apiCall, createFabricPoint, DESKTOP, openBrowser, shotScreen, signInAs, studioDate } from './browser';

/*
 * The desk's day without a catch (issue 14, front desk; JOURNEYS.md Reception 1–3) at 1366 × 900:
 * a double click books once, typed data is never thrown away without asking, and the address
 * keeps the week, the view and the open class. Everything happens in a room of its own.
 */

const baseUrl = inject('baseUrl');
const ROOM = 'Desk Walk Loft';
const CLASS = 'Silks Foundations';
const INSTRUCTOR = 'Ines Albrecht';
const day = studioDate(9);

let reception: BrowserContext;
let rigger: BrowserContext;
let desk: Page;
let roomId = 0;
let riggerApi: Page;
const points: Record<string, number> = {};
const consoleErrors: string[] = [];

beforeAll(async () => {
  rigger = await openBrowser(DESKTOP);
  const riggerPage = await rigger.newPage();
  await signInAs(riggerPage, baseUrl, 'rigger@loftwise.test');
  roomId = (await apiCall<{ id: number }>(riggerPage, baseUrl, 'POST', '/rooms', { name: ROOM })).id;
  for (const label of ['DW-1', 'DW-2', 'DW-3', 'DW-4', 'DW-5', 'DW-6']) points[label] = await createFabricPoint(riggerPage, baseUrl, { roomId, label });
  riggerApi = riggerPage;
  reception = await openBrowser(DESKTOP);
  desk = await reception.newPage();
  desk.on('console', (m) => { if (m.type() === 'error') consoleErrors.push(`${desk.url()}: ${m.text()}`); });
  desk.on('pageerror', (e) => consoleErrors.push(`${desk.url()}: ${e.message}`));
  await signInAs(desk, baseUrl, 'reception@loftwise.test');
});
afterAll(async () => {
  await reception?.close();
  await rigger?.close();
});

async function openSchedule(page: Page) {
  await page.goto(`${baseUrl}/schedule`);
  await page.getByRole('heading', { name: 'Schedule', level: 1 }).waitFor();
}

const bookingDialog = (page: Page) => page.getByRole('dialog', { name: 'Book a class' });
const discardQuestion = (page: Page) => page.getByRole('dialog', { name: 'Discard this booking?' });
const pointBox = (dialog: Locator, label: string) => dialog.getByRole('group', { name: 'Points' }).getByRole('listitem').filter({ hasText: label }).getByRole('checkbox');

async function fillBooking(page: Page, start: string) {
  await page.getByRole('button', { name: 'Book a class' }).click();
  const dialog = bookingDialog(page);
  await dialog.waitFor();
  await dialog.getByLabel('Class type').selectOption({ label: CLASS });
  await dialog.getByLabel('Instructor').selectOption({ label: INSTRUCTOR });
  await dialog.getByLabel('Room').selectOption({ label: ROOM });
  await dialog.getByLabel('Day').fill(day);
  await dialog.getByLabel('Starts').fill(start);
  await pointBox(dialog, 'DW-1').waitFor();
  return dialog;
}

async function classesOnDay(page: Page) {
  const from = new Date(`${day}T00:00:00Z`).getTime() - 86_400_000;
  const list = await apiCall<Array<{ roomId: number; cancelled: boolean }>>(page, baseUrl, 'GET', `/sessions?from=${new Date(from).toISOString()}&to=${new Date(from + 3 * 86_400_000).toISOString()}&roomId=${roomId}`);
  return list.filter((s) => !s.cancelled);
}

async function classTypeId() {
  return (await apiCall<Array<{ id: number; name: string }>>(desk, baseUrl, 'GET', '/class-types')).find((c) => c.name === CLASS)!.id;
}
async function instructorId() {
  return (await apiCall<Array<{ id: number; name: string }>>(desk, baseUrl, 'GET', '/instructors')).find((u) => u.name === INSTRUCTOR)!.id;
}

describe('the desk books without a catch', () => {
  it('makes one booking from a double click on Book, and says so once', async () => {
    await openSchedule(desk);
    const dialog = await fillBooking(desk, '07:00');
    await pointBox(dialog, 'DW-1').check();
    await dialog.getByRole('button', { name: 'Book', exact: true }).dblclick();
    await dialog.waitFor({ state: 'hidden' });
    await desk.getByText(`Booked ${CLASS}`).first().waitFor();
    // Give a second answer time to arrive, if one had been sent.
    await desk.waitForTimeout(1000);
    expect(await desk.getByText(`Booked ${CLASS}`).count()).toBe(1);
    expect(await desk.getByText(/Not booked|cannot be booked/).count()).toBe(0);
    expect(await classesOnDay(desk)).toHaveLength(1);
  });

  it('asks before Escape throws away what was typed; keeping it keeps every field', async () => {
    await openSchedule(desk);
    const dialog = await fillBooking(desk, '10:00');
    await pointBox(dialog, 'DW-2').check();
    await desk.keyboard.press('Escape');
    await discardQuestion(desk).waitFor();
    await shotScreen(desk, 'desk-discard-question');
    await discardQuestion(desk).getByRole('button', { name: 'Keep editing' }).click();
    await discardQuestion(desk).waitFor({ state: 'hidden' });
    expect(await dialog.isVisible()).toBe(true);
    expect(await dialog.getByLabel('Starts').inputValue()).toBe('10:00');
    expect(await pointBox(dialog, 'DW-2').isChecked()).toBe(true);

    // The Close button asks too; discarding closes the dialog and books nothing.
    await dialog.getByRole('button', { name: 'Close', exact: true }).first().click();
    await discardQuestion(desk).getByRole('button', { name: 'Discard what I typed' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await classesOnDay(desk)).toHaveLength(1);
    expect(desk.url()).toContain('/schedule');
  });

  it('asks before Back throws away what was typed, and closes an untouched dialog without asking', async () => {
    await openSchedule(desk);
    const dialog = await fillBooking(desk, '11:00');
    await desk.goBack();
    await discardQuestion(desk).waitFor();
    await discardQuestion(desk).getByRole('button', { name: 'Keep editing' }).click();
    expect(await dialog.getByLabel('Starts').inputValue()).toBe('11:00');
    await discardQuestion(desk).getByRole('button', { name: 'Keep editing' }).waitFor({ state: 'hidden' });
    await dialog.getByRole('button', { name: 'Close', exact: true }).first().click();
    await discardQuestion(desk).getByRole('button', { name: 'Discard what I typed' }).click();
    await dialog.waitFor({ state: 'hidden' });

    await desk.getByRole('button', { name: 'Book a class' }).click();
    await bookingDialog(desk).waitFor();
    await desk.keyboard.press('Escape');
    await bookingDialog(desk).waitFor({ state: 'hidden' });
    expect(await discardQuestion(desk).isVisible()).toBe(false);
  });

  it('keeps the week, the view and the open class across a reload; Back closes the class, not Schedule', async () => {
    await openSchedule(desk);
    const title = desk.locator('.fc-toolbar-title');
    const thisWeek = await title.innerText();
    await desk.getByRole('button', { name: 'Next ›' }).click();
    await expect.poll(() => title.innerText()).not.toBe(thisWeek);
    const nextWeek = await title.innerText();
    await desk.reload();
    await expect.poll(() => title.innerText()).toBe(nextWeek);
    expect(new URL(desk.url()).searchParams.get('view')).toBe('week');

    await desk.getByRole('button', { name: 'Day', exact: true }).click();
    await expect.poll(() => new URL(desk.url()).searchParams.get('view')).toBe('day');
    const dayTitle = await title.innerText();
    await desk.reload();
    await expect.poll(() => title.innerText()).toBe(dayTitle);
    await desk.getByRole('button', { name: 'Week', exact: true }).click();

    // Open the class booked above from the agenda (its week), reload: the drawer is open again.
    const [booked] = await classesOnDay(desk) as Array<{ id?: number }>;
    await desk.goto(`${baseUrl}/schedule?date=${day}&view=week`);
    await desk.getByRole('region', { name: /^Agenda/ }).getByRole('button').filter({ hasText: ROOM }).first().click();
    const drawer = desk.getByRole('dialog', { name: CLASS });
    await drawer.waitFor();
    expect(new URL(desk.url()).searchParams.get('class')).toBe(String(booked.id));
    await desk.reload();
    await drawer.waitFor();
    await drawer.getByRole('region', { name: 'Booked points' }).waitFor();
    await shotScreen(desk, 'desk-reload-keeps-class');
    await drawer.getByRole('button', { name: 'Close' }).click();
    await drawer.waitFor({ state: 'hidden' });

    await desk.getByRole('region', { name: /^Agenda/ }).getByRole('button').filter({ hasText: ROOM }).first().click();
    await drawer.waitFor();
    await desk.goBack();
    await drawer.waitFor({ state: 'hidden' });
    expect(new URL(desk.url()).pathname).toBe('/schedule');
    expect(await desk.getByRole('heading', { name: 'Schedule', level: 1 }).isVisible()).toBe(true);
  });

  it('swaps a point for this and the following classes of a weekly series when asked', async () => {
    const first = studioDate(10);
    const series = await apiCall<{ sessionIds: number[] }>(desk, baseUrl, 'POST', '/sessions', {
      classTypeId: await classTypeId(), instructorId: await instructorId(), roomId, pointIds: [points['DW-3']],
      startsAt: `${first}T06:00:00Z`, endsAt: `${first}T07:00:00Z`, rrule: 'FREQ=WEEKLY;COUNT=3',
    });
    await desk.goto(`${baseUrl}/schedule?date=${first}&view=week&class=${series.sessionIds[0]}`);
    const drawer = desk.getByRole('dialog', { name: CLASS });
    await drawer.getByRole('button', { name: 'Change points' }).click();
    const form = drawer.getByRole('form', { name: 'Change points' });
    await pointBox(form, 'DW-4').waitFor();
    await pointBox(form, 'DW-3').uncheck();
    await pointBox(form, 'DW-4').check();
    await form.locator('label').filter({ hasText: 'This and the following' }).click();
    await shotScreen(desk, 'desk-swap-following');
    await form.getByRole('button', { name: 'Save points' }).click();
    await expect.poll(() => drawer.getByRole('status').filter({ hasText: /\S/ }).innerText()).toContain('for this and the following classes');
    for (const id of series.sessionIds) expect((await apiCall<{ pointIds: number[] }>(desk, baseUrl, 'GET', `/sessions/${id}`)).pointIds).toEqual([points['DW-4']]);
  });

  it('moves a class whose only point is blocked to another time with a free point, in one step', async () => {
    const when = studioDate(11);
    const booked = await apiCall<{ id: number }>(desk, baseUrl, 'POST', '/sessions', {
      classTypeId: await classTypeId(), instructorId: await instructorId(), roomId, pointIds: [points['DW-5']], startsAt: `${when}T06:00:00Z`, endsAt: `${when}T07:00:00Z`,
    });
    await apiCall(riggerApi, baseUrl, 'POST', '/faults', { pointId: points['DW-5'], severity: 'high', description: 'Sling sheath cut' });
    await desk.goto(`${baseUrl}/schedule?date=${when}&view=week&class=${booked.id}`);
    const drawer = desk.getByRole('dialog', { name: CLASS });
    await drawer.getByRole('button', { name: 'Move', exact: true }).click();
    const form = drawer.getByRole('form', { name: 'Move the class' });
    await form.getByLabel('Starts').fill('05:00');
    await form.getByLabel('Ends').fill('06:00');
    await pointBox(form, 'DW-6').waitFor();
    expect(await pointBox(form, 'DW-5').isChecked()).toBe(false);
    await pointBox(form, 'DW-6').check();
    await shotScreen(desk, 'desk-move-with-point');
    await form.getByRole('button', { name: 'Move', exact: true }).click();
    await expect.poll(() => drawer.getByRole('status').filter({ hasText: /\S/ }).innerText()).toContain('Moved to');
    const after = await apiCall<{ pointIds: number[]; atRisk: boolean }>(desk, baseUrl, 'GET', `/sessions/${booked.id}`);
    expect(after).toMatchObject({ pointIds: [points['DW-6']], atRisk: false });
  });

  it('showed no console error on any of these pages', () => {
    expect(consoleErrors).toEqual([]);
  });
});
