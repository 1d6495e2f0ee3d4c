import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import { openBrowser, shot, signInAs, pageErrors, withoutRefusals } from './browser';

const baseUrl = inject('baseUrl');
let browser: BrowserContext;
beforeAll(async () => {
  browser = await openBrowser();
});
afterAll(async () => browser?.close());

const expected: Record<string, string[]> = {
  owner: ['Today', 'Schedule', 'Rig', 'Inspections', 'Faults', 'Students', 'Class types', 'Staff', 'Settings', 'Mailbox', 'Audit'],
  reception: ['Today', 'Schedule', 'Rig', 'Faults', 'Students', 'Class types', 'Staff'],
  instructor: ['Today', 'Schedule', 'Rig', 'Faults', 'Students'],
  rigger: ['Today', 'Schedule', 'Rig', 'Inspections', 'Faults'],
};

describe('signing in as each demo role', () => {
  for (const [role, items] of Object.entries(expected)) {
    it(`shows ${role} their own navigation`, async () => {
      const page = await browser.newPage();
      await signInAs(page, baseUrl, `${role}@loftwise.test`);
      const nav = page.getByRole('navigation', { name: 'Main' });
      const labels = (await nav.getByRole('link').allInnerTexts()).map((s) => s.trim());
      expect(labels).toEqual(items);
      await shot(page, `nav-${role}`);
      await page.getByRole('button', { name: 'Sign out' }).first().click();
      await page.waitForURL('**/sign-in');
      await page.close();
    });
  }

  it('sends a signed-out visitor to the sign-in page and back after signing in', async () => {
    const page = await browser.newPage();
    await page.goto(`${baseUrl}/staff`);
    await page.waitForURL('**/sign-in');
    await signInAs(page, baseUrl, 'owner@loftwise.test');
    await page.waitForURL('**/staff');
    await page.getByRole('heading', { name: 'Staff' }).waitFor();
    // The list arrives after the heading: wait for a row, then count (a busy machine showed the heading alone).
    const rigger = page.getByRole('cell', { name: 'rigger@loftwise.test' });
    await rigger.first().waitFor();
    expect(await rigger.count()).toBe(1);
    await page.close();
  });

  it('says so plainly when the password is wrong, and keeps what was typed', async () => {
    const page = await browser.newPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel('E-mail', { exact: true }).fill('rigger@loftwise.test');
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByRole('alert').innerText()).resolves.toContain('do not match');
    expect(await page.getByLabel('E-mail', { exact: true }).inputValue()).toBe('rigger@loftwise.test');
    await page.close();
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    // 401: the signed-out visit to /staff asks who is signed in and is told nobody, on purpose.
    expect(withoutRefusals(pageErrors, [401])).toEqual([]);
  });
});
