import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { apiOf, axeFor, createFabricPoint, DESKTOP, openBrowser, shot, shotScreen, signInAs, startSoonToday, uniqueTag } from './browser';

/*
 * The rigger on a tablet (issue 14; JOURNEYS.md Rigger 1–5) at 1024 × 768: a failed row's note is
 * wide enough to type in and "Mark all pass" comes after the rows; the gear table fits; a point
 * blocked by quarantined gear sends the rigger to that item's after-incident inspection, which
 * releases it; swaps offer the same kind only; "add one" links to the gear page; the gear badge
 * never says "In service" for an item that cannot be used; rating edits ask before voiding; every
 * blocking reason is listed; the point page shows the caution once and "Not allowed" first. Each
 * page touched is checked by axe and for console errors. Everything runs on rows of its own.
 */

const baseUrl = inject('baseUrl');
const TABLET = { width: 1024, height: 768 };
const tag = uniqueTag();
const PASSWORD = 'rigger-journey-pw';

let rigBrowser: BrowserContext;
let page: Page;
const consoleErrors: string[] = [];
const others: BrowserContext[] = [];
let roomId = 0;
const ids = { inspectPoint: 0, quarantinePoint: 0, fabric: 0, classPoint: 0 };

async function settled(p: Page) {
  await p.locator('h1').first().waitFor();
  await p.waitForLoadState('networkidle');
}

/** axe on the page as it stands: nothing serious or critical. */
async function axeClean(p: Page) {
  const { violations } = await axeFor(p).analyze();
  const blocking = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(blocking.map((v) => `${p.url()} ${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`)).toEqual([]);
}

const api = () => apiOf(page, baseUrl);

beforeAll(async () => {
  rigBrowser = await openBrowser(TABLET);
  page = await rigBrowser.newPage();
  page.on('console', (m) => { if (m.type() === 'error') consoleErrors.push(`${page.url()}: ${m.text()}`); });
  page.on('pageerror', (e) => consoleErrors.push(`${page.url()}: ${e.message}`));
  await signInAs(page, baseUrl, 'rigger@loftwise.test');
  roomId = (await api().post<{ id: number }>('/rooms', { name: `Rigger Room ${tag}` })).id;
  ids.inspectPoint = await createFabricPoint(page, baseUrl, { roomId, label: `RI-${tag}` });
  ids.quarantinePoint = await createFabricPoint(page, baseUrl, { roomId, label: `RQ-${tag}` });
  ids.classPoint = await createFabricPoint(page, baseUrl, { roomId, label: `RC-${tag}` });
  const path = await api().get<{ links: Array<{ gear: { id: number; kind: string } }> }>(`/points/${ids.quarantinePoint}`);
  ids.fabric = path.links.find((l) => l.gear.kind === 'fabric')!.gear.id;
  // The fabric needs its own inspection in force, or the point would be blocked before the drop.
  await api().post(`/gear/${ids.fabric}/inspections`, { kind: 'periodic', result: 'pass' });

  // A silks class on the quarantine point within the hour, so it is on today's board.
  const owner = await openBrowser(DESKTOP);
  others.push(owner);
  const ownerPage = await owner.newPage();
  await signInAs(ownerPage, baseUrl, 'owner@loftwise.test');
  const instructor = await apiOf(ownerPage, baseUrl).post<{ id: number }>('/users', { email: `rigger-journey-${tag.toLowerCase()}@loftwise.test`, name: `Ivy Journey ${tag}`, role: 'instructor', password: PASSWORD });
  const silks = (await apiOf(ownerPage, baseUrl).get<Array<{ id: number; apparatus: string; performersPerPoint: number }>>('/class-types')).find((c) => c.apparatus === 'fabric' && c.performersPerPoint === 1)!;
  const start = await startSoonToday();
  await apiOf(ownerPage, baseUrl).post('/sessions', { classTypeId: silks.id, instructorId: instructor.id, roomId, pointIds: [ids.quarantinePoint], startsAt: start.toISOString(), endsAt: new Date(start.getTime() + 30 * 60_000).toISOString() });
}, 480_000);

afterAll(async () => {
  for (const c of others) await c.close();
  await rigBrowser?.close();
});

// A shared two-core machine: axe on full pages takes its time.
describe('the rigger at 1024 × 768', { timeout: 150_000 }, () => {
  it('types the required note of a failed row in a full-width field, finds "Mark all pass" after the rows, and every row is recorded', async () => {
    await page.goto(`${baseUrl}/inspections?point=${ids.inspectPoint}`);
    await settled(page);
    const form = page.getByRole('form', { name: new RegExp(`^Inspect RI-${tag}`) });
    const rows = form.locator('ol > li');
    await rows.first().waitFor();
    const count = await rows.count();
    expect(count).toBeGreaterThan(4);
    const markAll = form.getByRole('button', { name: 'Mark all pass' });
    // After the last row, not above the first.
    expect((await markAll.boundingBox())!.y).toBeGreaterThan((await rows.last().boundingBox())!.y);

    const first = rows.first();
    await first.getByText('Fail', { exact: true }).click();
    const note = first.getByLabel('What failed (required)');
    await note.fill('Hairline crack at the clamp bolt hole, about 4 mm');
    const [noteBox, rowBox] = [await note.boundingBox(), await first.boundingBox()];
    // Wide enough to read what is typed, and inside its row (not clipped by it).
    expect(noteBox!.width).toBeGreaterThan(300);
    expect(noteBox!.x + noteBox!.width).toBeLessThanOrEqual(rowBox!.x + rowBox!.width);
    await note.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-inspection-failed-note');
    await axeClean(page);

    // The shortcut fills only the rows still open, and leaves the failed one as it is.
    await form.getByRole('button', { name: `Mark the other ${count - 1} pass` }).click();
    await form.getByRole('button', { name: 'Sign the inspection' }).click();
    await page.getByText(/still blocked|did not clear|not cleared/i).first().waitFor();
    const log = await api().get<{ items: Array<{ pointId: number | null; items: Array<{ result: string; note: string }> }> }>(`/inspections?pointId=${ids.inspectPoint}`);
    const latest = log.items[0];
    expect(latest.items).toHaveLength(count);
    expect(latest.items[0]).toMatchObject({ result: 'fail', note: 'Hairline crack at the clamp bolt hole, about 4 mm' });
    expect(latest.items.slice(1).every((i) => i.result === 'pass')).toBe(true);
  });

  it('sees the whole gear table, "Mounted on" included, with a long model name kept inside its cell', async () => {
    const long = `FlangeGripFG-2-extra-wide adjustable beam clamp with locking spindle ${tag}`;
    await api().post('/gear', { kind: 'beam_clamp', material: 'steel', gate: 'none', majorKn: 50, serial: `BC-LONG-${tag}`, maker: 'Test Forge', model: long, multiDirectional: false });
    await page.goto(`${baseUrl}/rig/gear`);
    await settled(page);
    const table = page.getByRole('table', { name: 'Gear items' });
    await table.waitFor();
    const header = table.getByRole('columnheader', { name: 'Mounted on' });
    const box = (await header.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(TABLET.width);
    // The table does not scroll sideways inside its card.
    expect(await table.evaluate((t) => t.parentElement!.scrollWidth <= t.parentElement!.clientWidth + 1)).toBe(true);
    const cell = table.getByTitle(`Test Forge ${long}`);
    const cellBox = (await cell.boundingBox())!;
    expect(cellBox.x + cellBox.width).toBeLessThan(box.x);
    await cell.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-gear-table');
    await axeClean(page);
  });

  it('is sent from Today and the point page to the dropped fabric’s after-incident inspection, which releases the point', async () => {
    await api().post(`/gear/${ids.fabric}/events`, { kind: 'drop', note: 'Slipped off the hook while lowering' });
    const fabric = await api().get<{ serial: string }>(`/gear/${ids.fabric}`);

    await page.goto(`${baseUrl}/today`);
    await settled(page);
    const card = page.getByTestId(`point-card-${ids.quarantinePoint}`);
    await card.waitFor();
    await card.getByText(`Fabric ${fabric.serial} is quarantined`).waitFor();
    expect(await card.getByRole('link', { name: /Inspect and clear/ }).count()).toBe(0);
    const inspectGear = card.getByRole('link', { name: new RegExp(`^Inspect fabric ${fabric.serial}`) });
    await inspectGear.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-today-quarantined');
    await axeClean(page);

    // The point page says the same.
    await page.goto(`${baseUrl}/rig/points/${ids.quarantinePoint}`);
    await settled(page);
    expect(await page.getByRole('link', { name: 'Inspect and clear' }).count()).toBe(0);
    await page.getByRole('link', { name: `Inspect fabric ${fabric.serial}` }).click();

    // The gear page opens with the after-incident inspection chosen.
    await page.waitForURL(/\/rig\/gear\/\d+\?inspect=1$/);
    await page.getByRole('heading', { name: `Inspect Fabric ${fabric.serial}` }).waitFor();
    const form = page.getByRole('form', { name: `Inspect ${fabric.serial}` });
    expect(await form.getByRole('radio', { name: 'After an incident' }).isChecked()).toBe(true);
    await shotScreen(page, 'rigger-1024-gear-after-incident');
    await axeClean(page);
    await form.getByText('Pass', { exact: true }).click();
    await form.getByRole('button', { name: 'Record the inspection' }).click();
    await page.getByText(`${fabric.serial} passed and is back in service.`).waitFor();
    await page.locator('[data-standing="in_service"]').first().waitFor();

    const point = await api().get<{ status: { status: string } }>(`/points/${ids.quarantinePoint}`);
    expect(point.status.status).not.toBe('blocked');
  });

  it('offers an Inspect action for a new item, and never a green "In service" for one past its service life', async () => {
    const fresh = await api().post<{ id: number }>('/gear', { kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 25, serial: `CN-${tag}`, multiDirectional: false });
    const old = await api().post<{ id: number }>('/gear', { kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 25, serial: `CO-${tag}`, multiDirectional: false, manufacturedOn: '2012-01-10', serviceLifeYears: 10 });
    await api().post(`/gear/${old.id}/inspections`, { kind: 'periodic', result: 'pass' });

    await page.goto(`${baseUrl}/rig/gear/${old.id}`);
    await settled(page);
    const oldBadge = page.locator('[data-standing]').first();
    expect(await oldBadge.innerText()).toBe('Past its service life');
    expect(await page.getByText('In service', { exact: true }).count()).toBe(0);

    await page.goto(`${baseUrl}/rig/gear/${fresh.id}`);
    await settled(page);
    expect(await page.locator('[data-standing]').first().innerText()).toBe('Never inspected');
    await page.getByRole('link', { name: 'Inspect', exact: true }).click();
    await page.getByRole('heading', { name: `Inspect Carabiner CN-${tag}` }).waitFor();
    expect(await page.getByRole('radio', { name: 'Periodic' }).isChecked()).toBe(true);
    await shotScreen(page, 'rigger-1024-gear-new-inspect');
    await axeClean(page);

    // The gear row offers it too.
    await page.goto(`${baseUrl}/rig/gear?q=CN-${tag}`);
    await settled(page);
    await page.getByRole('link', { name: `Inspect CN-${tag}` }).waitFor();
  });

  it('swaps a beam clamp only for a beam clamp, and "Resolve: replaced" with no stock links to adding one', async () => {
    await api().post('/gear', { kind: 'beam_clamp', material: 'steel', gate: 'none', majorKn: 50, serial: `BC-SPARE-${tag}`, multiDirectional: false });
    await page.goto(`${baseUrl}/rig/points/${ids.classPoint}`);
    await settled(page);
    await page.getByRole('button', { name: 'Edit load path' }).click();
    const swap = page.getByLabel(new RegExp(`^Swap Beam clamp RC-${tag}-BC for`));
    await swap.waitFor();
    // The spare gear arrives after the list opens: wait for the new clamp before reading the options.
    await swap.locator('option', { hasText: `BC-SPARE-${tag}` }).waitFor({ state: 'attached' });
    const options = (await swap.locator('option').allInnerTexts()).slice(1);
    expect(options.length).toBeGreaterThan(0);
    expect(options.every((o) => o.startsWith('Beam clamp'))).toBe(true);
    expect(options).toContain(`Beam clamp BC-SPARE-${tag}`);
    await swap.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-swap-same-kind');
    await page.getByRole('button', { name: 'Cancel', exact: true }).click();

    // A pulley with nothing of its kind in stock.
    const pulley = await api().post<{ id: number }>('/gear', { kind: 'pulley', material: 'steel', gate: 'none', majorKn: 30, serial: `PU-${tag}`, multiDirectional: false });
    const fault = await api().post<{ id: number }>('/faults', { gearId: pulley.id, severity: 'low', description: `Sheave wobbles ${tag}` });
    await page.goto(`${baseUrl}/faults`);
    await settled(page);
    await page.getByRole('button', { name: `Resolve fault #${fault.id}` }).click();
    const resolveForm = page.getByRole('form', { name: `Resolve fault #${fault.id}` });
    await resolveForm.getByText('Replaced', { exact: true }).click();
    const add = resolveForm.getByRole('link', { name: 'Add one on the gear page' });
    await add.waitFor();
    await shotScreen(page, 'rigger-1024-resolve-no-stock');
    await axeClean(page);
    await add.click();
    await page.waitForURL(/\/rig\/gear\?add=pulley$/);
    const addForm = page.getByRole('form', { name: 'Add a gear item' });
    await addForm.waitFor();
    expect(await addForm.getByLabel('Kind').inputValue()).toBe('pulley');
  });

  it('asks before a structural-rating or gear-rating edit voids a clearance, naming the point', async () => {
    const label = `RC-${tag}`;
    await page.goto(`${baseUrl}/rig/points/${ids.classPoint}`);
    await settled(page);
    await page.getByRole('button', { name: 'Edit point' }).click();
    await page.getByLabel(/^Structural rating/).fill('18');
    await page.getByRole('button', { name: 'Save point' }).click();
    const ask = page.getByRole('dialog', { name: `Void the clearance of point ${label}?` });
    await ask.waitFor();
    expect(await ask.innerText()).toContain('Once saved, the point is blocked');
    await shotScreen(page, 'rigger-1024-rating-confirm');
    await ask.getByRole('button', { name: 'Cancel' }).click();
    await ask.waitFor({ state: 'hidden' });
    expect((await api().get<{ structuralRatingKn: number; status: { status: string } }>(`/points/${ids.classPoint}`)).structuralRatingKn).toBe(20);

    // The beam clamp's rating, from its gear page.
    const point = await api().get<{ links: Array<{ gear: { id: number; kind: string } }> }>(`/points/${ids.classPoint}`);
    const clamp = point.links.find((l) => l.gear.kind === 'beam_clamp')!.gear.id;
    await page.goto(`${baseUrl}/rig/gear/${clamp}`);
    await settled(page);
    await page.getByRole('button', { name: 'Edit item' }).click();
    await page.getByLabel(/^Breaking strength, major axis/).fill('45');
    await page.getByRole('button', { name: 'Save item' }).click();
    const askGear = page.getByRole('dialog', { name: `Void the clearance of point ${label}?` });
    await askGear.waitFor();
    await axeClean(page);
    await askGear.getByRole('button', { name: 'Save and void the clearance' }).click();
    await askGear.waitFor({ state: 'hidden' });
    await page.getByText(/saved\./).first().waitFor();
    expect((await api().get<{ status: { reasons: Array<{ code: string }> } }>(`/points/${ids.classPoint}`)).status.reasons.map((r) => r.code)).toContain('awaiting_clearance');
  });

  it('lists a rule violation beside "awaits clearance" on the rig page, not behind "(and 1 more)"', async () => {
    // A three-way load on the (not multi-directional) carabiner: a rule violation, and the path change voids the clearance.
    const point = await api().get<{ links: Array<{ gearId: number; mode: string; threeWay: boolean; basketOverHalf: boolean; gear: { kind: string } }> }>(`/points/${ids.inspectPoint}`);
    const links = point.links.map((l) => ({ gearId: l.gearId, mode: l.mode, threeWay: l.gear.kind === 'carabiner', basketOverHalf: l.basketOverHalf }));
    await api().put(`/points/${ids.inspectPoint}/load-path`, { links });
    await page.goto(`${baseUrl}/rig`);
    await settled(page);
    const row = page.getByRole('link').filter({ hasText: `RI-${tag}` });
    await row.waitFor();
    const text = await row.innerText();
    expect(text).not.toContain('more)');
    expect(text).toMatch(/three-way load/);
    await row.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-rig-reasons');
    await axeClean(page);
  });

  it('shows the caution once on the point page, and "Not allowed" first with no "Passes" for an apparatus the point does not take', async () => {
    await page.goto(`${baseUrl}/rig/points/${ids.classPoint}`);
    await settled(page);
    await page.getByRole('heading', { name: 'Load check of the saved path, per class' }).waitFor();
    await page.getByText('Checking…').first().waitFor({ state: 'detached' }).catch(() => undefined);
    expect(await page.getByTestId('safety-caution').filter({ visible: true }).count()).toBe(1);
    const notAllowed = page.locator('details summary').filter({ hasText: 'not allowed on this point' }).first();
    await notAllowed.waitFor();
    const summary = await notAllowed.innerText();
    expect(summary.trim().startsWith('Not allowed')).toBe(true);
    expect(summary).not.toContain('Passes');
    await notAllowed.scrollIntoViewIfNeeded();
    await shotScreen(page, 'rigger-1024-point-checks');
    await shot(page, 'rigger-1024-point-page');
    await axeClean(page);
  });

  it('showed no console error on any of these pages', () => {
    expect(consoleErrors).toEqual([]);
  });
});

