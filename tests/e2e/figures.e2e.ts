import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiOf, axeFor, createFabricPoint, DESKTOP, openBrowser, pageErrors, shot, shotScreen, signInAs, uniqueTag, withoutRefusals } from './browser';

// Issue 11: figures shown honestly (PRODUCT.md §4.8) and a policy change confirmed after its
// effect is shown (§4.9). Each test makes its own rows; the studio policy is put back as it was.

const baseUrl = inject('baseUrl');
const LBF_IN_N = 4.4482216152605;
let browser: BrowserContext;

beforeAll(async () => {
  browser = await openBrowser(DESKTOP);
});
afterAll(async () => browser?.close());

const until = <T>(fn: () => Promise<T>) => expect.poll(fn, { timeout: 15_000, interval: 200 });

async function signedIn(email: string): Promise<{ page: Page; api: ReturnType<typeof apiOf> }> {
  const page = await browser.newPage();
  await signInAs(page, baseUrl, email);
  return { page, api: apiOf(page, baseUrl) };
}

describe('figures shown honestly', () => {
  it('converts a typed 5000 lbf to 22.24 kN when the unit is switched, and stores the exact figure', async () => {
    const { page, api } = await signedIn('rigger@loftwise.test');
    const serial = `CS-SW-${uniqueTag()}`;
    await page.goto(`${baseUrl}/rig/gear`);
    await page.getByRole('button', { name: 'Add a gear item' }).click();
    const form = page.getByRole('form', { name: 'Add a gear item' });
    await form.getByLabel('Serial or lot number').fill(serial);
    const units = form.getByRole('group', { name: 'Figures typed in' });
    await units.getByText('lbf', { exact: true }).click();
    await form.getByLabel('Breaking strength, major axis (lbf)').fill('5000');
    await units.getByText('kN', { exact: true }).click();
    // The number is converted, not relabelled: 5000 lbf = 22.2411 kN, shown cut down.
    const major = form.getByLabel('Breaking strength, major axis (kN)');
    await until(() => major.inputValue()).toBe('22.24');
    await form.getByText('Stored as 22.24 kN.').waitFor();
    await shot(page, 'figures-01-lbf-switched-to-kn');
    // And back: the field reads the marking again.
    await units.getByText('lbf', { exact: true }).click();
    await until(() => form.getByLabel('Breaking strength, major axis (lbf)').inputValue()).toBe('5000');
    await units.getByText('kN', { exact: true }).click();
    await form.getByRole('button', { name: 'Add item' }).click();
    await page.getByRole('heading', { name: `Carabiner ${serial}` }).waitFor();
    const id = Number(/\/rig\/gear\/(\d+)$/.exec(page.url())?.[1]);
    const stored = await api.get<{ majorKn: number }>(`/gear/${id}`);
    expect(stored.majorKn).toBeCloseTo((5000 * LBF_IN_N) / 1000, 9);
    await page.close();
  });

  it('reads a factor of 4.996 against the required 5 as "4.99 ×", failing', async () => {
    const { page, api } = await signedIn('rigger@loftwise.test');
    const policy = (await api.get<{ policy: { requiredFactor: number; bodyMassKg: number; dynamicFactors: Record<string, number> } }>('/studio')).policy;
    const types = await api.get<Array<{ id: number; name: string; active: boolean; performersPerPoint: number; bodyMassKg: number | null; dynamicFactor: number | null }>>('/class-types');
    const silks = types.find((t) => t.name === 'Silks Foundations' && t.active);
    if (!silks) throw new Error('The demo seed should hold the class type Silks Foundations');
    expect(policy.requiredFactor).toBe(5);
    // The design load of the class; a carabiner rated 4.996 × it is the weakest link.
    const w = (silks.performersPerPoint * (silks.bodyMassKg ?? policy.bodyMassKg) * 9.80665 * (silks.dynamicFactor ?? policy.dynamicFactors.fabric)) / 1000;
    const tag = uniqueTag();
    const room = await api.post<{ id: number }>('/rooms', { name: `E2E Figures Room ${tag}` });
    const point = await api.post<{ id: number }>('/points', { roomId: room.id, label: `F${tag}`, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric'], maxPerformers: 1 });
    const gear = (kind: string, extra: Record<string, unknown>) => api.post<{ id: number }>('/gear', { kind, multiDirectional: false, serial: `${kind.slice(0, 2).toUpperCase()}-${tag}`, ...extra });
    const chain = [
      await gear('beam_clamp', { material: 'steel', gate: 'none', majorKn: 50 }),
      await gear('carabiner', { material: 'steel', gate: 'screw', majorKn: 4.996 * w }),
      await gear('fabric', { material: 'nylon', gate: 'none', majorKn: 32 }),
    ];
    await api.put(`/points/${point.id}/load-path`, { links: chain.map((g) => ({ gearId: g.id, mode: 'major', threeWay: false, basketOverHalf: false })) });
    const check = await api.get<{ achievedFactor: number; pass: boolean }>(`/points/${point.id}/load-check?classTypeId=${silks.id}`);
    expect(check.achievedFactor).toBeCloseTo(4.996, 9);
    expect(check.pass).toBe(false);

    await page.goto(`${baseUrl}/rig/points/${point.id}`);
    const row = page.locator('details').filter({ has: page.getByText('Silks Foundations', { exact: true }) }).first();
    const summary = row.locator('summary').first();
    await until(() => summary.innerText()).toContain('Fails');
    expect(await summary.innerText()).toContain('factor 4.99 × of 5 × required');
    if (!(await row.evaluate((d) => (d as HTMLDetailsElement).open))) await summary.click();
    const achieved = row.locator('dl > div').filter({ has: page.locator('dt', { hasText: /^Factor achieved$/ }) }).locator('dd').first();
    expect(await achieved.innerText()).toBe('4.99 ×');
    expect(await row.innerText()).toContain('is 4.99 times the design load');
    await shot(page, 'figures-02-factor-4-99');
    await page.close();
  });
});

describe('gear data that cannot be true', () => {
  it('is refused next to its field in the gear form, and nothing is added', async () => {
    const { page, api } = await signedIn('rigger@loftwise.test');
    const serial = `CS-BAD-${uniqueTag()}`;
    await page.goto(`${baseUrl}/rig/gear`);
    await page.getByRole('button', { name: 'Add a gear item' }).click();
    const form = page.getByRole('form', { name: 'Add a gear item' });
    await form.getByLabel('Serial or lot number').fill(serial);
    await form.getByLabel('Breaking strength, major axis (kN)').fill('22');
    await form.getByLabel('Working load limit (optional) (kN)').fill('1100');
    await form.getByLabel('Manufactured on (optional)').fill('2024-05-01');
    await form.getByLabel('In service since (optional)').fill('2023-01-10');
    await form.getByRole('button', { name: 'Add item' }).click();
    const wll = form.getByLabel('Working load limit (optional) (kN)');
    const since = form.getByLabel('In service since (optional)');
    await until(() => wll.getAttribute('aria-invalid')).toBe('true');
    await form.getByText('The working load limit cannot exceed the major-axis breaking strength').waitFor();
    await form.getByText('It cannot go into service before it was manufactured').waitFor();
    expect(await since.getAttribute('aria-invalid')).toBe('true');
    await shot(page, 'figures-05-impossible-gear');
    const found = await api.get<Array<{ serial: string }>>(`/gear?q=${encodeURIComponent(serial)}`);
    expect(found).toEqual([]);
    await page.close();
  });
});

describe('the studio’s display unit and a factor below 5', () => {
  it('opens stored ratings in lbf when the studio shows lbf, writes the working in lbf with kN beside, and shows the reason beside a factor below 5', async () => {
    const { page, api } = await signedIn('owner@loftwise.test');
    const original = await api.get<{ name: string; policy: Record<string, unknown> }>('/studio');
    const reason = `Static trial term, engineer’s letter ${uniqueTag()}`;
    try {
      const tag = uniqueTag();
      const room = await api.post<{ id: number }>('/rooms', { name: `E2E Units Room ${tag}` });
      const point = await api.post<{ id: number }>('/points', { roomId: room.id, label: `U${tag}`, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric'], maxPerformers: 1 });
      const gear = (kind: string, extra: Record<string, unknown>) => api.post<{ id: number }>('/gear', { kind, multiDirectional: false, serial: `U${kind.slice(0, 2).toUpperCase()}-${tag}`, ...extra });
      const biner = await gear('carabiner', { material: 'steel', gate: 'screw', majorKn: (5000 * LBF_IN_N) / 1000 });
      const chain = [await gear('beam_clamp', { material: 'steel', gate: 'none', majorKn: 50 }), biner, await gear('fabric', { material: 'nylon', gate: 'none', majorKn: 32 })];
      await api.put(`/points/${point.id}/load-path`, { links: chain.map((g) => ({ gearId: g.id, mode: 'major', threeWay: false, basketOverHalf: false })) });
      const saved = await page.request.patch(`${baseUrl}/api/studio`, { data: { name: original.name, policy: { ...original.policy, units: 'lbf', requiredFactor: 4, requiredFactorReason: reason } }, headers: { Origin: baseUrl } });
      expect(saved.ok()).toBe(true);

      // The edit form opens the stored 22.2411 kN as the 5000 lbf of its marking.
      await page.goto(`${baseUrl}/rig/gear/${biner.id}`);
      await page.getByRole('button', { name: 'Edit item' }).click();
      const form = page.getByRole('form', { name: /^Edit / });
      expect(await form.getByLabel('Breaking strength, major axis (lbf)').inputValue()).toBe('5000');
      await form.getByRole('button', { name: 'Cancel' }).click();

      // The saved path's check: the reason beside the factor, the working in lbf with kN beside.
      await page.goto(`${baseUrl}/rig/points/${point.id}`);
      const row = page.locator('details').filter({ has: page.getByText('Silks Foundations', { exact: true }) }).first();
      const summary = row.locator('summary').first();
      await until(() => summary.innerText()).toContain('of 4 × required');
      expect(await summary.innerText()).toContain(`below 5 × because: ${reason}`);
      if (!(await row.evaluate((d) => (d as HTMLDetailsElement).open))) await summary.click();
      expect(await row.getByTestId('factor-reason').innerText()).toContain(reason);
      await row.getByText('Show the working, step by step').click();
      const strengthRow = await row.getByRole('row').filter({ hasText: `Link 2, Carabiner UCA-${tag}` }).first().innerText();
      expect(strengthRow).toContain("5,000.0 lbf (22.2411 kN)");
      await shot(page, 'figures-04-lbf-working-and-reason');
    } finally {
      const res = await page.request.patch(`${baseUrl}/api/studio`, { data: { name: original.name, policy: original.policy }, headers: { Origin: baseUrl } });
      expect(res.ok()).toBe(true);
      await page.close();
    }
  });
});

describe('a policy change', () => {
  it('asks for confirmation, shows what it does to today’s points, and saves only when confirmed', async () => {
    // A point of our own, cleared today: its round sling gives it the textile interval.
    const rigger = await signedIn('rigger@loftwise.test');
    const tag = uniqueTag();
    const room = await rigger.api.post<{ id: number }>('/rooms', { name: `E2E Policy Room ${tag}` });
    const label = `PV${tag}`;
    await createFabricPoint(rigger.page, baseUrl, { roomId: room.id, label });
    await rigger.page.close();

    const { page, api } = await signedIn('owner@loftwise.test');
    const original = (await api.get<{ name: string; policy: Record<string, unknown> & { intervalDays: { textile: number }; warningDays: number } }>('/studio'));
    try {
      await page.goto(`${baseUrl}/settings`);
      const textile = page.getByLabel('Textiles');
      await textile.fill('1');
      await page.getByRole('button', { name: 'Save policy' }).click();
      const dialog = page.getByRole('dialog', { name: 'Save this policy change?' });
      await dialog.waitFor();
      expect(await dialog.innerText()).toContain(`Textile interval: ${original.policy.intervalDays.textile} days → 1 days`);
      // Our point, cleared today for 30 days, would be cleared for one day only: expiring now.
      const ours = dialog.getByRole('region', { name: 'Points whose status changes now' }).getByRole('listitem').filter({ hasText: label });
      await ours.waitFor();
      expect(await ours.innerText()).toMatch(/Cleared\s*→\s*Expiring/);
      expect(await dialog.getByTestId('safety-caution').isVisible()).toBe(true);
      // The confirmation passes the same accessibility gate as the pages (nothing serious or critical).
      const { violations } = await axeFor(page).include('dialog[open]').analyze();
      expect(violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`)).toEqual([]);
      await shotScreen(page, 'figures-03-policy-confirm');
      await dialog.getByRole('button', { name: 'Cancel' }).click();
      await dialog.waitFor({ state: 'hidden' });
      expect((await api.get<{ policy: { intervalDays: { textile: number } } }>('/studio')).policy.intervalDays.textile).toBe(original.policy.intervalDays.textile);

      // A factor below 5 is not taken without a reason.
      await textile.fill(String(original.policy.intervalDays.textile));
      const factor = page.getByLabel('Required factor');
      await factor.fill('1');
      await page.getByRole('button', { name: 'Save policy' }).click();
      await page.getByText('A required factor below 5 needs a reason').waitFor();
      expect(await dialog.isVisible()).toBe(false);
      await factor.fill('5');

      // A harmless change, confirmed, is saved.
      await page.getByLabel('Warning window (days before a clearance runs out)').fill(String(original.policy.warningDays + 1));
      await page.getByRole('button', { name: 'Save policy' }).click();
      await dialog.waitFor();
      await dialog.getByRole('button', { name: 'Save the change' }).click();
      await page.getByText('Studio policy saved.').waitFor();
      await until(async () => (await api.get<{ policy: { warningDays: number } }>('/studio')).policy.warningDays).toBe(original.policy.warningDays + 1);
    } finally {
      const res = await page.request.patch(`${baseUrl}/api/studio`, { data: { name: original.name, policy: original.policy }, headers: { Origin: baseUrl } });
      expect(res.ok()).toBe(true);
      await page.close();
    }
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    expect(withoutRefusals(pageErrors, [])).toEqual([]);
  });
});
