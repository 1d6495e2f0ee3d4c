import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { openBrowser, PHONE, shot, shotScreen, signInAs, TINY_PNG } from './browser';

/*
 * The instructor on a phone (issue 14; JOURNEYS.md Instructor 1–3) at 390 × 844: Back during
 * "Report a fault" asks before losing the description, and the photo's remove button sits below
 * its preview. Nothing is reported here, so the demo's state is left as it was.
 */

const baseUrl = inject('baseUrl');
let phone: BrowserContext;
let page: Page;
const consoleErrors: string[] = [];

beforeAll(async () => {
  phone = await openBrowser(PHONE);
  page = await phone.newPage();
  page.on('console', (m) => { if (m.type() === 'error') consoleErrors.push(`${page.url()}: ${m.text()}`); });
  page.on('pageerror', (e) => consoleErrors.push(`${page.url()}: ${e.message}`));
  await signInAs(page, baseUrl, 'instructor@loftwise.test');
});
afterAll(async () => {
  await phone?.close();
});

describe('the instructor reports a fault on a phone without losing it', () => {
  it('asks before Back throws away a typed description, and keeps it when asked to', async () => {
    await page.goto(`${baseUrl}/today`);
    const report = page.getByRole('button', { name: /^Report a fault on / }).first();
    await report.waitFor();
    await report.click();
    const dialog = page.getByRole('dialog', { name: /^Report a fault on / });
    await dialog.getByLabel('What is wrong?').fill('Stitching pulled at the top loop');
    await dialog.getByLabel('Choose files').setInputFiles({ name: 'loop.png', mimeType: 'image/png', buffer: TINY_PNG });
    const remove = dialog.getByRole('button', { name: 'Remove loop.png' });
    await remove.waitFor();
    // The remove button sits below the preview, not over it.
    const img = dialog.locator('li').filter({ hasText: 'loop.png' }).locator('img');
    const [imgBox, removeBox] = [await img.boundingBox(), await remove.boundingBox()];
    expect(removeBox!.y).toBeGreaterThanOrEqual(imgBox!.y + imgBox!.height);
    await remove.scrollIntoViewIfNeeded();
    await shotScreen(page, 'instructor-fault-photo');

    await page.goBack();
    const ask = page.getByRole('dialog', { name: 'Discard this fault report?' });
    await ask.waitFor();
    await shotScreen(page, 'instructor-fault-back-asks');
    await ask.getByRole('button', { name: 'Keep writing' }).click();
    await ask.waitFor({ state: 'hidden' });
    expect(await dialog.getByLabel('What is wrong?').inputValue()).toBe('Stitching pulled at the top loop');
    expect(new URL(page.url()).pathname).toBe('/today');

    // Closing asks too; discarding leaves the board where it was.
    await dialog.getByRole('button', { name: 'Close without reporting' }).click();
    await ask.getByRole('button', { name: 'Discard it' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(new URL(page.url()).pathname).toBe('/today');
    await page.getByRole('button', { name: /^Report a fault on / }).first().waitFor();
  });

  it('closes an untouched fault form on Back without asking, staying on Today', async () => {
    await page.goto(`${baseUrl}/today`);
    await page.getByRole('button', { name: /^Report a fault on / }).first().click();
    const dialog = page.getByRole('dialog', { name: /^Report a fault on / });
    await dialog.getByLabel('What is wrong?').waitFor();
    await page.goBack();
    await dialog.waitFor({ state: 'hidden' });
    expect(new URL(page.url()).pathname).toBe('/today');
    expect(await page.getByRole('dialog', { name: 'Discard this fault report?' }).isVisible()).toBe(false);
  });

  it('shows each class within one phone screen, and the caution once, below the classes', async () => {
    await page.goto(`${baseUrl}/today`);
    const classes = page.getByRole('region', { name: 'Today’s classes' }).getByRole('article');
    await classes.first().waitFor();
    // Every class of the day not yet finished: the demo's instructor has two until its afternoon
    // class ends (the seed puts it at 16:00 at the latest) and then only the evening one, and other
    // files may have added their own, so the number depends on the hour and is not asserted.
    const count = await classes.count();
    for (let i = 0; i < count; i++) {
      const box = await classes.nth(i).boundingBox();
      expect(box!.height, `class ${i + 1} is ${box!.height} px tall`).toBeLessThanOrEqual(PHONE.height);
    }
    // Nothing that keeps a class safe folds away to fit: a blocked point says so, and why, without a tap.
    // The demo's blocked MH-2 may have been swapped off today's class by an earlier file sharing this
    // server (the desk's "this and the following" swap, depending on the hour), so every blocked card shown is checked.
    const blockedCards = classes.locator('li[data-testid^="point-card-"]').filter({ hasText: 'Blocked' });
    for (let i = 0; i < (await blockedCards.count()); i++) {
      await blockedCards.nth(i).getByText('Do not use this point.').waitFor();
      expect(await blockedCards.nth(i).getByRole('listitem').count(), 'a blocked point lists its reasons').toBeGreaterThan(0);
    }
    // The students are a line per point; their check-in opens from the class. The first class with
    // students: an earlier file sharing this server may have booked a class of its own, without
    // students, that starts before the demo's (depending on the hour).
    const first = classes.filter({ has: page.getByRole('button', { name: /^Check in/ }) }).first();
    const checkIn = first.getByRole('button', { name: /^Check in/ });
    expect(await checkIn.getAttribute('aria-expanded')).toBe('false');
    expect(await first.getByTestId('point-students').count()).toBeGreaterThan(0);
    const caution = page.getByTestId('safety-caution');
    expect(await caution.count()).toBe(1);
    const [firstBox, cautionBox] = [await first.boundingBox(), await caution.boundingBox()];
    expect(cautionBox!.y).toBeGreaterThan(firstBox!.y + firstBox!.height);
    await shotScreen(page, 'instructor-today-first-class');
  });

  it('shows the caution once, compact, below the classes', async () => {
    await page.goto(`${baseUrl}/today`);
    const classes = page.getByRole('region', { name: 'Today’s classes' }).getByRole('article');
    await classes.first().waitFor();
    const caution = page.getByTestId('safety-caution');
    expect(await caution.count()).toBe(1);
    const [last, cautionBox] = [await classes.last().boundingBox(), await caution.boundingBox()];
    expect(cautionBox!.y).toBeGreaterThan(last!.y + last!.height);
    expect(cautionBox!.height).toBeLessThan(160);
    await shot(page, 'instructor-today');
  });

  it('showed no console error on any of these pages', () => {
    expect(consoleErrors).toEqual([]);
  });
});
