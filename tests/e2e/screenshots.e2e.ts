import { afterAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiCall, DESKTOP, openBrowser, PHONE, shot, signInAs, watchConsole } from './browser';

/*
 * Every page at its role's width, into tests/e2e/screenshots/ (ignored by git) to be looked at:
 * the desk and the owner at 1366 × 900, the rigger on a 1024 × 768 tablet, the instructor on a
 * 390 × 844 phone (PRODUCT.md, JOURNEYS.md). Each page must finish loading with no console error.
 * Reads only: the demo's state is left as it was.
 */

const baseUrl = inject('baseUrl');
const TABLET = { width: 1024, height: 768 };
const contexts: BrowserContext[] = [];
afterAll(async () => {
  for (const c of contexts) await c.close();
});

async function as(email: string, viewport: { width: number; height: number }) {
  const context = await openBrowser(viewport);
  contexts.push(context);
  const errors = watchConsole(context);
  const page = await context.newPage();
  await signInAs(page, baseUrl, email);
  return { page, errors };
}

/** Opens a page and waits until its data is in: no request running, no "Loading…" left. */
async function visit(page: Page, path: string) {
  await page.goto(`${baseUrl}${path}`);
  // Pages that poll never go quiet for long: wait a little for the network, then for the content.
  await page.waitForLoadState('networkidle', { timeout: 5_000 }).catch(() => undefined);
  await page.getByText(/^Loading/).first().waitFor({ state: 'hidden', timeout: 15_000 }).catch(() => undefined);
  await page.locator('h1').first().waitFor();
  expect(await page.getByText('There is no page at this address').count(), path).toBe(0);
  expect(await page.getByText('This page is not part of your role').count(), path).toBe(0);
}

async function walk(email: string, role: string, viewport: { width: number; height: number }, paths: (page: Page) => Promise<string[]>) {
  const { page, errors } = await as(email, viewport);
  for (const path of await paths(page)) {
    await visit(page, path);
    await shot(page, `page-${role}-${path.replace(/^\//, '').replace(/[/?=&]+/g, '-') || 'home'}`);
  }
  expect(errors).toEqual([]);
}

/** A point and a gear item of the demo studio, for their own pages. */
async function somePointAndGear(page: Page) {
  const points = await apiCall<Array<{ id: number }>>(page, baseUrl, 'GET', '/points');
  const gear = await apiCall<{ items?: Array<{ id: number }> } | Array<{ id: number }>>(page, baseUrl, 'GET', '/gear');
  const items = Array.isArray(gear) ? gear : (gear.items ?? []);
  return { pointId: points[0].id, gearId: items[0].id };
}

describe('a screenshot of every page at its role’s width', () => {
  it('the sign-in page on a phone and at the desk', { timeout: 120_000 }, async () => {
    for (const [name, viewport] of [['phone', PHONE], ['desk', DESKTOP]] as const) {
      const context = await openBrowser(viewport);
      contexts.push(context);
      const errors = watchConsole(context);
      const page = await context.newPage();
      await page.goto(`${baseUrl}/sign-in`);
      await page.getByLabel('E-mail', { exact: true }).waitFor();
      await shot(page, `page-sign-in-${name}`);
      expect(errors).toEqual([]);
    }
  });

  it('the instructor’s pages on a phone', async () => {
    await walk('instructor@loftwise.test', 'instructor', PHONE, async () => ['/today', '/schedule', '/rig', '/faults', '/faults/new', '/account']);
  }, 240_000);

  it('the desk’s pages at 1366 wide', async () => {
    await walk('reception@loftwise.test', 'reception', DESKTOP, async () => ['/today', '/schedule', '/class-types', '/rig', '/faults', '/staff', '/account']);
  }, 240_000);

  it('the rigger’s pages on a tablet', async () => {
    await walk('rigger@loftwise.test', 'rigger', TABLET, async (page) => {
      const { pointId, gearId } = await somePointAndGear(page);
      return ['/today', '/schedule', '/rig', `/rig/points/${pointId}`, '/rig/gear', `/rig/gear/${gearId}`, '/rig/labels', '/inspections', '/faults', '/account'];
    });
  }, 240_000);

  it('the owner’s pages at 1366 wide', async () => {
    await walk('owner@loftwise.test', 'owner', DESKTOP, async (page) => {
      const { pointId } = await somePointAndGear(page);
      return ['/today', '/schedule', '/class-types', '/rig', `/rig/points/${pointId}`, '/rig/gear', '/inspections', '/faults', '/staff', '/settings', '/mailbox', '/audit', '/account'];
    });
  }, 240_000);
});
