import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { apiOf, createFabricPoint, openBrowser, shot, signInAs, uniqueTag, pageErrors, withoutRefusals } from './browser';

// The owner's records: the audit page's filters, and the printable inspection log on paper.
const baseUrl = inject('baseUrl');
let browser: BrowserContext;
let owner: Page;
const tag = uniqueTag();
const label = `PR-${tag}`;
let pointId: number;

/** The text of a PDF, page by page, through poppler's pdftotext (installed with the browser in CI). */
function pdfPages(pdf: Buffer): string[] {
  const file = join(mkdtempSync(join(tmpdir(), 'loftwise-pdf-')), 'log.pdf');
  writeFileSync(file, pdf);
  return execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).split('\f').filter((p) => p.trim());
}

beforeAll(async () => {
  browser = await openBrowser();
  // The rigger clears a point of our own, then its fabric is quarantined and it is inspected again:
  // every item passes, yet the point stays blocked, so that inspection did not clear it.
  const rigger = await browser.newPage();
  await signInAs(rigger, baseUrl, 'rigger@loftwise.test');
  const api = apiOf(rigger, baseUrl);
  const room = await api.post<{ id: number }>('/rooms', { name: `E2E Records Room ${tag}` });
  pointId = await createFabricPoint(rigger, baseUrl, { roomId: room.id, label });
  const point = await api.get<{ links: Array<{ gear: { id: number; kind: string } }> }>(`/points/${pointId}`);
  const fabric = point.links.find((l) => l.gear.kind === 'fabric')!.gear.id;
  await api.post(`/gear/${fabric}/quarantine`, { reason: 'Pulled threads near the knot' });
  const { items } = await api.get<{ items: Array<{ key: string }> }>(`/points/${pointId}/checklist`);
  const again = await api.post<{ cleared: boolean; status: { status: string } }>(`/points/${pointId}/clearances`, { items: items.map((i) => ({ key: i.key, result: 'pass' })), notes: 'Looked again; fabric stays down.' });
  expect(again.status.status).toBe('blocked');
  await rigger.close();
  owner = await browser.newPage();
  await signInAs(owner, baseUrl, 'owner@loftwise.test');
});
afterAll(async () => browser?.close());

describe('the owner’s audit page', () => {
  it('filters by what and who, says what is wrong with a range, and clears the filters', async () => {
    const rigger = (await apiOf(owner, baseUrl).get<Array<{ name: string; email: string }>>('/users')).find((u) => u.email === 'rigger@loftwise.test')!;
    await owner.goto(`${baseUrl}/audit`);
    const table = owner.getByTestId('audit-entries');
    await table.waitFor();
    const rows = table.locator('tbody tr');

    await owner.getByLabel('What').selectOption({ label: 'Cleared a point' });
    await owner.waitForURL(/action=point\.cleared/);
    await expect.poll(async () => (await rows.allInnerTexts()).every((t) => t.includes('Cleared a point'))).toBe(true);
    expect(await rows.count()).toBeGreaterThan(0);

    await owner.getByLabel('What').selectOption({ label: 'Quarantined gear' });
    await owner.getByLabel('Who').selectOption({ label: rigger.name });
    await expect.poll(async () => (await rows.allInnerTexts()).join('\n')).toContain('Pulled threads near the knot');
    expect((await rows.allInnerTexts()).every((t) => t.includes(rigger.name) && t.includes('Quarantined gear'))).toBe(true);
    await shot(owner, 'audit-filtered');

    await owner.getByLabel('From').fill('2026-12-10');
    await owner.getByLabel('To').fill('2026-12-01');
    // The message follows the typed dates; wait for it rather than read the page at once (a busy machine was slower).
    await owner.getByText('The end of the range comes before its start').waitFor();
    expect(await table.count()).toBe(0);

    await owner.getByRole('button', { name: 'Clear the filters' }).click();
    await table.waitFor();
    expect(new URL(owner.url()).search).toBe('');
  });
});

describe('the inspection log on screen and on paper', () => {
  it('shows the inspection that did not clear its point as not cleared, on screen and in the printable log', async () => {
    await owner.goto(`${baseUrl}/inspections`);
    const log = owner.getByTestId('inspection-log');
    await log.getByLabel('Point').selectOption({ label: `${label} — E2E Records Room ${tag}` });
    const newest = log.getByTestId('inspection-entry').first();
    await expect.poll(() => newest.innerText()).toContain('Did not clear the point.');
    expect(await newest.innerText()).toContain('quarantined');
    expect(await newest.innerText()).toMatch(/Status when signed:\s*Blocked/);

    const [printable] = await Promise.all([owner.context().waitForEvent('page'), log.getByRole('link', { name: /Printable log/ }).click()]);
    await printable.waitForLoadState('load');
    const first = printable.locator('article').first();
    expect(await first.innerText()).toMatch(/Did not clear the point/i);
    expect(await printable.locator('article').count()).toBe(2);
    expect(await printable.content()).not.toMatch(/newest \d+ shown/);
    const foot = await printable.getByTestId('chain-head').innerText();
    const head = /(\d+:[0-9a-f]{64})/.exec(foot)?.[1];
    expect(head).toBeDefined();
    await shot(printable, 'printable-log');

    for (const format of ['A4', 'Letter'] as const) {
      const pages = pdfPages(await printable.pdf({ format }));
      expect(pages[0]).toMatch(/Page 1 of \d+/);
      expect(pages.join('\n')).toContain(head!.slice(0, 40));
      expect(pages.join('\n')).toMatch(/DID NOT CLEAR the point/);
      expect(pages.join('\n')).not.toMatch(/Print this log/);
    }
    await printable.close();
  });

  it('ends the printable log with the classes held, each point as recorded at the class’s start, and offers them as a CSV', async () => {
    await owner.goto(`${baseUrl}/inspections`);
    const log = owner.getByTestId('inspection-log');
    const csv = log.getByRole('link', { name: /Classes held CSV/ });
    expect(await csv.getAttribute('href')).toBe('/api/sessions/records/export.csv');
    const [printable] = await Promise.all([owner.context().waitForEvent('page'), log.getByRole('link', { name: /Printable log/ }).click()]);
    await printable.waitForLoadState('load');
    // The demo studio's past classes were recorded at their start.
    const held = printable.getByTestId('classes-held');
    expect(await held.getByRole('heading', { name: 'Classes held' }).isVisible()).toBe(true);
    expect(await held.locator('.class').count()).toBeGreaterThan(0);
    expect(await held.locator('th').allInnerTexts()).toEqual(expect.arrayContaining([expect.stringMatching(/status at start/i), expect.stringMatching(/apparatus that hung/i)]));
    expect(await printable.getByText(/^Caution\./).count()).toBe(1);
    expect(await printable.getByTestId('chain-head').innerText()).toMatch(/\d+ class(es)? held \(\d+ booked points?\)/);
    await held.scrollIntoViewIfNeeded();
    await shot(printable, 'printable-classes-held');
    const pages = pdfPages(await printable.pdf({ format: 'A4' }));
    expect(pages.join('\n')).toContain('Classes held');
    await printable.close();
  });

  it('prints the point page with its history, without its controls, numbered', async () => {
    await owner.goto(`${baseUrl}/rig/points/${pointId}`);
    await owner.getByTestId('point-history').getByTestId('inspection-entry').first().waitFor();
    const pages = pdfPages(await owner.pdf({ format: 'A4' }));
    const text = pages.join('\n');
    expect(pages[0]).toMatch(/Page 1 of \d+/);
    expect(text).toContain('Did not clear the point.');
    expect(text).toMatch(/Printed \d+ \w+ \d{4}/);
    expect(text).not.toContain('Report a fault');
    expect(text).not.toContain('Edit load path');
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    expect(withoutRefusals(pageErrors, [])).toEqual([]);
  });
});
