import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiCall, DESKTOP, openBrowser, pageErrors, withoutRefusals, shot, shotScreen, signInAs, uniqueTag } from './browser';

/*
 * The desk renames, retires and brings back a class type (issue 14), at 1366 × 900; the owner
 * filters the Mailbox by kind and recipient, and the filter survives a reload. Every date on the
 * Mailbox is the studio's one format ("2 Dec 2026, 05:03"), never the browser's. A settings value
 * out of range is named beside its field in words, and nothing is saved.
 */

const baseUrl = inject('baseUrl');
let browser: BrowserContext;
let desk: Page;
let owner: Page;

beforeAll(async () => {
  browser = await openBrowser(DESKTOP);
  desk = await browser.newPage();
  await signInAs(desk, baseUrl, 'reception@loftwise.test');
});
afterAll(async () => browser?.close());

describe('class types on their own page', () => {
  it('renames, retires with a confirm (gone from the booking form) and brings back a type', async () => {
    const name = `Lyra Basics ${uniqueTag()}`;
    await apiCall(desk, baseUrl, 'POST', '/class-types', { name, apparatus: 'hoop', durationMinutes: 60, capacity: 6, performersPerPoint: 1 });
    await desk.goto(`${baseUrl}/class-types`);
    await desk.getByRole('link', { name: 'Class types' }).waitFor();
    const inUse = desk.getByRole('region', { name: 'In use' });
    const row = inUse.getByRole('row').filter({ hasText: name });
    await row.waitFor();

    // Rename: a name another type has is refused beside the field, in words.
    await row.getByRole('button', { name: `Rename ${name}` }).click();
    const field = desk.getByLabel(`New name for ${name}`);
    await field.fill('Silks Foundations');
    await desk.getByRole('button', { name: 'Save' }).click();
    await desk.getByRole('alert').filter({ hasText: 'Already used' }).waitFor();
    await field.fill('');
    await desk.getByRole('button', { name: 'Save' }).click();
    await desk.getByRole('alert').filter({ hasText: 'Enter a class name' }).waitFor();
    const renamed = `${name} Plus`;
    await field.fill(renamed);
    await desk.getByRole('button', { name: 'Save' }).click();
    const renamedRow = inUse.getByRole('row').filter({ hasText: renamed });
    await renamedRow.getByRole('button', { name: `Retire ${renamed}` }).waitFor();

    // Retire asks first; Cancel keeps it in use.
    await renamedRow.getByRole('button', { name: `Retire ${renamed}` }).click();
    const ask = desk.getByRole('dialog', { name: `Retire “${renamed}”?` });
    await ask.waitFor();
    await shotScreen(desk, 'class-types-retire-asks');
    await ask.getByRole('button', { name: 'Cancel' }).click();
    await ask.waitFor({ state: 'hidden' });
    await renamedRow.getByRole('button', { name: `Retire ${renamed}` }).click();
    await ask.getByRole('button', { name: 'Retire' }).click();
    const retiredRow = desk.getByRole('region', { name: 'Retired' }).getByRole('row').filter({ hasText: renamed });
    await retiredRow.waitFor();
    expect(await retiredRow.innerText()).toContain('Retired');
    await shot(desk, 'class-types-with-retired');

    // The booking form no longer offers it.
    const types = await apiCall<Array<{ name: string; active: boolean }>>(desk, baseUrl, 'GET', '/class-types');
    expect(types.find((t) => t.name === renamed)?.active).toBe(false);
    await desk.goto(`${baseUrl}/schedule`);
    await desk.getByRole('heading', { name: 'Schedule', level: 1 }).waitFor();
    await desk.getByRole('button', { name: /Book a class/ }).first().click();
    const select = desk.getByRole('dialog', { name: 'Book a class' }).getByLabel('Class type');
    await select.waitFor();
    const offered = await select.locator('option').allInnerTexts();
    expect(offered).toContain('Silks Foundations');
    expect(offered).not.toContain(renamed);
    await desk.keyboard.press('Escape');

    // Bring it back: one click, no question.
    await desk.goto(`${baseUrl}/class-types`);
    await desk.getByRole('region', { name: 'Retired' }).getByRole('button', { name: `Bring back ${renamed}` }).click();
    await inUse.getByRole('row').filter({ hasText: renamed }).waitFor();
  });
});

describe('the owner’s Mailbox', () => {
  it('filters by kind and recipient, keeps the filter in the address, and shows dates in the studio’s format', async () => {
    owner = await browser.newPage();
    await signInAs(owner, baseUrl, 'owner@loftwise.test');
    await owner.goto(`${baseUrl}/mailbox`);
    const caught = owner.getByRole('list', { name: 'Caught messages' }).getByRole('listitem');
    await caught.first().waitFor();
    const all = await caught.count();
    expect(all).toBeGreaterThan(0);
    const text = await caught.first().innerText();
    expect(text).toMatch(/\d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}/);
    expect(text).not.toMatch(/\d{1,2}\/\d{1,2}\/\d{4}|[AP]M\b/);

    await owner.getByLabel('Kind').selectOption('reminder');
    await owner.waitForURL(/kind=reminder/);
    await expect.poll(async () => (await caught.allInnerTexts()).every((t) => t.includes('Reminder ·'))).toBe(true);
    await owner.getByLabel('Recipient').selectOption('instructor@loftwise.test');
    await owner.waitForURL(/to=instructor%40loftwise.test/);
    await expect.poll(async () => (await caught.allInnerTexts()).every((t) => t.includes('to instructor@loftwise.test'))).toBe(true);
    const filtered = await caught.count();
    expect(filtered).toBeLessThanOrEqual(all);

    await owner.reload();
    expect(await owner.getByLabel('Kind').inputValue()).toBe('reminder');
    expect(await owner.getByLabel('Recipient').inputValue()).toBe('instructor@loftwise.test');
    await shot(owner, 'mailbox-filtered');

    await owner.getByRole('button', { name: 'Show all messages' }).click();
    await owner.waitForURL((u) => !u.search.includes('kind='));
    await expect.poll(() => caught.count()).toBeGreaterThanOrEqual(all);
  });
});

describe('the owner’s settings', () => {
  it('says what is wrong beside a settings field, in words, and saves nothing', async () => {
    if (!owner) {
      owner = await browser.newPage();
      await signInAs(owner, baseUrl, 'owner@loftwise.test');
    }
    const before = await apiCall<{ name: string; policy: { reminderLeadHours: number[]; studentCancelCutoffHours: number } }>(owner, baseUrl, 'GET', '/studio');
    await owner.goto(`${baseUrl}/settings`);
    const reminders = owner.getByLabel('Reminder lead times (hours before class)');
    const cutoff = owner.getByLabel('Students cancel up to (hours before class)');
    await reminders.waitFor();
    /** The message the field points at (aria-describedby), once it is marked invalid. */
    const messageOf = async (field: typeof reminders) => {
      await expect.poll(() => field.getAttribute('aria-invalid')).toBe('true');
      const id = (await field.getAttribute('aria-describedby'))!;
      return owner.locator(`[id="${id}"]`).innerText();
    };
    // A reminder at 0 hours passes the list's shape; its value is out of range, and the field says so.
    await reminders.fill('24, 0');
    await cutoff.fill('400');
    await owner.getByRole('button', { name: 'Save policy' }).click();
    const reminderSays = await messageOf(reminders);
    const cutoffSays = await messageOf(cutoff);
    for (const said of [reminderSays, cutoffSays]) expect(said).not.toMatch(/Too (small|big)|expected|>=|<=|Invalid/);
    expect(reminderSays).toBe('Each reminder at least 0.25 hours (15 minutes) before class');
    expect(cutoffSays).toBe('At most 336 hours (14 days) before class');
    await shotScreen(owner, 'settings-field-errors');
    expect(await owner.getByRole('dialog', { name: 'Save this policy change?' }).count()).toBe(0);

    // Nothing was saved: a reload shows the studio's values as they were.
    await owner.reload();
    await reminders.waitFor();
    expect(await reminders.inputValue()).toBe(before.policy.reminderLeadHours.join(', '));
    expect(Number(await cutoff.inputValue())).toBe(before.policy.studentCancelCutoffHours);
    const after = await apiCall<typeof before>(owner, baseUrl, 'GET', '/studio');
    expect(after.policy).toEqual(before.policy);
  });
});

describe('the browser console', () => {
  it('showed no console error on any of these pages', () => {
    // 409: the rename to a name another type has, refused on purpose above.
    expect(withoutRefusals(pageErrors, [409])).toEqual([]);
  });
});
