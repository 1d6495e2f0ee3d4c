import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Locator, Page } from 'playwright-core';
import { fixedToward, formatFactor, formatForce, formatLoad } from '../../shared/rigging';
import { apiOf, DESKTOP, openBrowser, shot, signInAs, uniqueTag, pageErrors, withoutRefusals } from './browser';

// The rigger's journeys on the rig pages (JOURNEYS.md, Rigger 4 and 5), at a desktop's width.
// Every test makes its own room, points and gear, so nothing here leans on another file's data.

const baseUrl = inject('baseUrl');
const G = 9.80665;
let browser: BrowserContext;
let api: ReturnType<typeof apiOf>;
let policy: { units: 'kN' | 'lbf' | 'kgf'; bodyMassKg: number; requiredFactor: number; dynamicFactors: Record<string, number> };
let silks: { name: string; performersPerPoint: number; bodyMassKg: number | null; dynamicFactor: number | null };

beforeAll(async () => {
  browser = await openBrowser(DESKTOP);
  const page = await browser.newPage();
  await signInAs(page, baseUrl, 'rigger@loftwise.test');
  api = apiOf(page, baseUrl);
  policy = (await api.get('/studio')).policy;
  const types: Array<typeof silks & { active: boolean }> = await api.get('/class-types');
  const found = types.find((t) => t.name === 'Silks Foundations' && t.active);
  if (!found) throw new Error('The demo seed should hold the class type Silks Foundations');
  silks = found;
});
afterAll(async () => browser?.close());

// ---- data made through the API (the forms under test are driven through the page)

type Kind = 'beam_clamp' | 'round_sling' | 'span_set' | 'carabiner' | 'quick_link' | 'fabric';
interface GearModel { kind: Kind; material: string; gate: string; majorKn: number; minorKn?: number; gateOpenKn?: number; wllKn?: number; prefix: string }
const MODELS = {
  beamClamp: { kind: 'beam_clamp', material: 'steel', gate: 'none', majorKn: 50, wllKn: 10, prefix: 'BC' },
  roundSling: { kind: 'round_sling', material: 'polyester', gate: 'none', majorKn: 40, wllKn: 8, prefix: 'RS' },
  spanSet: { kind: 'span_set', material: 'polyester', gate: 'none', majorKn: 35, wllKn: 7, prefix: 'SS' },
  steelCarabiner: { kind: 'carabiner', material: 'steel', gate: 'screw', majorKn: 45, minorKn: 14, gateOpenKn: 13, prefix: 'CS' },
  weakQuickLink: { kind: 'quick_link', material: 'steel', gate: 'screw', majorKn: 15, prefix: 'QL' },
  fabric: { kind: 'fabric', material: 'nylon', gate: 'none', majorKn: 32, prefix: 'FB' },
} satisfies Record<string, GearModel>;
const KIND_WORDS: Record<Kind, string> = { beam_clamp: 'Beam clamp', round_sling: 'Round sling', span_set: 'Span set', carabiner: 'Carabiner', quick_link: 'Quick link', fabric: 'Fabric' };

interface MadeGear { id: number; serial: string; name: string; majorKn: number }
async function makeGear(model: GearModel, serial: string): Promise<MadeGear> {
  const { prefix, ...fields } = model;
  void prefix;
  const g = await api.post<{ id: number; serial: string }>('/gear', { ...fields, multiDirectional: false, serial, maker: 'E2E Test Forge' });
  return { id: g.id, serial: g.serial, name: `${KIND_WORDS[model.kind]} ${g.serial}`, majorKn: model.majorKn };
}

async function makePoint(tag: string, label: string, links: MadeGear[]) {
  const room = await api.post<{ id: number; name: string }>('/rooms', { name: `E2E Rules Room ${tag}` });
  const point = await api.post<{ id: number }>('/points', { roomId: room.id, label, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric'], maxPerformers: 1 });
  await api.put(`/points/${point.id}/load-path`, { links: links.map((g) => ({ gearId: g.id, mode: 'major', threeWay: false, basketOverHalf: false })) });
  return point.id;
}

// ---- what the pages show

/** The design load of Silks Foundations under the studio's policy, in kN. */
function silksDesignLoadKn() {
  return (silks.performersPerPoint * (silks.bodyMassKg ?? policy.bodyMassKg) * G * (silks.dynamicFactor ?? policy.dynamicFactors.fabric)) / 1000;
}
/** As the load check view writes a design load (a load, cut up): two decimals in kN, whole figures otherwise. */
const designLoadText = (kn: number) => formatLoad(kn, policy.units, policy.units === 'kN' ? 2 : 0);
/** A factor is cut down to two decimals (PRODUCT.md §4.8). */
const factorText = (f: number) => `${formatFactor(f)} ×`;
/** As the working table writes a load in kN: up to four decimals, cut up. */
const workingKn = (kn: number) => `${Number(fixedToward(kn, 4, 'up'))} kN`;

const until = <T>(fn: () => Promise<T>) => expect.poll(fn, { timeout: 15_000, interval: 200 });

/** One class's row of a load-check list (the editor's preview or the saved path's checks). */
function checkRow(scope: Page | Locator, className: string): Locator {
  const page = 'page' in scope && typeof scope.page === 'function' ? (scope as Locator).page() : (scope as Page);
  return scope.locator('details').filter({ has: page.getByText(className, { exact: true }) }).first();
}
/** Opens a row if it is closed (a row of the saved path's checks stays open across a refetch). */
async function openRow(row: Locator) {
  if (!(await row.evaluate((d) => (d as HTMLDetailsElement).open))) await row.locator('summary').first().click();
  await row.getByText('Chain strength', { exact: true }).waitFor();
}
function figure(row: Locator, term: string): Locator {
  return row.locator('dl > div').filter({ has: row.page().locator('dt', { hasText: new RegExp(`^${term}$`) }) }).locator('dd').first();
}
const summaryOf = (row: Locator) => row.locator('summary').first();

/** The editor's card for one link, found by the gear it holds. */
function linkItem(page: Page, gear: MadeGear): Locator {
  return page.getByRole('list', { name: 'Load path being edited, from the structure down' }).getByRole('listitem').filter({ has: page.getByRole('link', { name: gear.name, exact: true }) });
}

async function addToPath(page: Page, gear: MadeGear) {
  await page.getByLabel('Add a link').selectOption({ label: gear.name });
  await page.getByRole('button', { name: 'Add to the path' }).click();
  await linkItem(page, gear).waitFor();
}

describe('the rigger builds and checks load paths', () => {
  it('builds a load path on a new point, sees it pass with the working shown, then sees it fail when a weak link goes in', async () => {
    const page = await browser.newPage();
    const tag = uniqueTag();
    const roomName = `E2E Rig Room ${tag}`;
    const label = `R${tag}`;
    const clamp = await makeGear(MODELS.beamClamp, `BC-${tag}`);
    const sling = await makeGear(MODELS.roundSling, `RS-${tag}`);
    const biner = await makeGear(MODELS.steelCarabiner, `CS-${tag}`);
    const fabric = await makeGear(MODELS.fabric, `FB-${tag}`);
    const weak = await makeGear(MODELS.weakQuickLink, `QL-${tag}`);

    // A room and a point, through the rig register's own forms.
    await page.goto(`${baseUrl}/rig`);
    await page.getByRole('button', { name: 'Add a room' }).click();
    await page.getByRole('form', { name: 'Add a room' }).getByLabel('Room name').fill(roomName);
    await page.getByRole('button', { name: 'Add room', exact: true }).click();
    await page.getByRole('heading', { name: roomName, exact: true }).waitFor();
    await page.getByRole('button', { name: `Add a point in ${roomName}` }).click();
    const form = page.getByRole('form', { name: 'Add a point' });
    await form.getByLabel('Label', { exact: true }).fill(label);
    await form.getByLabel('Structural rating (kN)').fill('20');
    await form.getByLabel('Most performers at once').fill('2');
    await form.getByLabel('Fabric', { exact: true }).check();
    await form.getByLabel('Trapeze', { exact: true }).check();
    await shot(page, 'rig-01-add-point');
    await form.getByRole('button', { name: 'Add point' }).click();
    await page.getByRole('list', { name: `Points in ${roomName}` }).getByRole('link', { name: new RegExp(`^${label}\\b`) }).click();
    await page.getByRole('heading', { name: `Point ${label}` }).waitFor();
    await page.getByText('No links yet. The point stays blocked until its fixed links are entered.').waitFor();

    // The chain from the structure down: beam clamp, round sling, steel carabiner, fabric.
    await page.getByRole('button', { name: 'Edit load path' }).click();
    for (const g of [clamp, sling, biner, fabric]) await addToPath(page, g);
    const editor = page.getByRole('list', { name: 'Load path being edited, from the structure down' });
    const cards = (await editor.getByRole('listitem').allInnerTexts()).join('\n');
    expect(cards.indexOf(clamp.name)).toBeLessThan(cards.indexOf(sling.name));
    expect(cards.indexOf(biner.name)).toBeLessThan(cards.indexOf(fabric.name));

    // The preview of the unsaved path, for the solo fabric class: passes, with its figures and working.
    const w = silksDesignLoadKn();
    const strength = Math.min(clamp.majorKn, sling.majorKn, biner.majorKn, fabric.majorKn);
    const preview = page.getByRole('region', { name: 'Preview of the load check (not saved)' });
    const row = checkRow(preview, 'Silks Foundations');
    await openRow(row);
    await until(() => summaryOf(row).innerText()).toContain('Passes');
    expect(await figure(row, 'Design load').innerText()).toBe(designLoadText(w));
    expect(await figure(row, 'Chain strength').innerText()).toBe(formatForce(strength, policy.units));
    expect(await figure(row, 'Factor achieved').innerText()).toBe(factorText(strength / w));
    expect(await row.innerText()).toContain(`Studio requires ${factorText(policy.requiredFactor)}`);
    expect(await row.innerText()).toContain('No rule is broken and there are no warnings.');
    await row.getByText('Show the working, step by step').click();
    const working = row.getByRole('table', { name: /Working of the load check/ });
    await working.waitFor();
    const designRow = await working.getByRole('row').filter({ hasText: 'Design load W = performers × body mass × g × dynamic factor' }).innerText();
    expect(designRow).toContain(`performers: ${silks.performersPerPoint}`);
    expect(designRow).toContain(`body mass: ${silks.bodyMassKg ?? policy.bodyMassKg} kg`);
    expect(designRow).toContain('gravity: 9.80665 m/s²');
    expect(designRow).toContain(`dynamic factor: ${silks.dynamicFactor ?? policy.dynamicFactors.fabric}`);
    expect(designRow).toContain(workingKn(w));
    const chainRow = await working.getByRole('row').filter({ hasText: 'Chain strength = the smallest strength' }).innerText();
    expect(chainRow).toContain(`link 1: ${clamp.majorKn} kN`);
    expect(chainRow).toContain(`link 4: ${fabric.majorKn} kN`);
    expect(chainRow).toContain(`weakest link: 4 (${fabric.name})`);
    expect(chainRow).toContain(`${strength} kN`);
    expect(await working.getByRole('row').filter({ hasText: 'Achieved factor = chain strength ÷ W' }).innerText()).toContain(String(Number(fixedToward(strength / w, 4, 'down'))));
    await expect(row.getByTestId('safety-caution').innerText()).resolves.toContain('do not replace inspection by a qualified rigger');
    await shot(page, 'rig-02-preview-passes');

    // Saved: the server's check of the saved path agrees, with the same working.
    await page.getByRole('button', { name: 'Save load path' }).click();
    await page.getByText('The load path was saved. The point had no clearance in force to void').waitFor();
    const saved = checkRow(page, 'Silks Foundations');
    await until(() => summaryOf(saved).innerText()).toContain('Passes');
    await openRow(saved);
    expect(await figure(saved, 'Chain strength').innerText()).toBe(formatForce(strength, policy.units));
    expect(await figure(saved, 'Design load').innerText()).toBe(designLoadText(w));
    await saved.getByText('Show the working, step by step').click();
    expect(await saved.getByRole('row').filter({ hasText: 'Design load W =' }).innerText()).toContain(workingKn(w));
    expect(await saved.getByTestId('safety-caution').isVisible()).toBe(true);
    await shot(page, 'rig-03-saved-passes');

    // A 15 kN quick link goes in above the fabric: the chain is now too weak for the class.
    await page.getByRole('button', { name: 'Edit load path' }).click();
    await addToPath(page, weak);
    const order = (await editor.getByRole('listitem').allInnerTexts()).join('\n');
    expect(order.indexOf(weak.name)).toBeLessThan(order.indexOf(fabric.name));
    const failing = checkRow(preview, 'Silks Foundations');
    await openRow(failing);
    await until(() => summaryOf(failing).innerText()).toContain('Fails');
    expect(await figure(failing, 'Chain strength').innerText()).toBe(formatForce(weak.majorKn, policy.units));
    const reason = failing.getByText(`The weakest link is ${weak.name} (link 4)`);
    await reason.waitFor();
    expect(await reason.innerText()).toContain(`the studio requires at least ${String(Number(policy.requiredFactor.toFixed(2)))} times`);
    await shot(page, 'rig-04-preview-fails');

    await page.getByRole('button', { name: 'Save load path' }).click();
    await page.getByRole('button', { name: 'Edit load path' }).waitFor();
    const savedFail = checkRow(page, 'Silks Foundations');
    await until(() => summaryOf(savedFail).innerText()).toContain('Fails');
    await openRow(savedFail);
    await savedFail.getByText(`The weakest link is ${weak.name} (link 4)`).waitFor();
    await shot(page, 'rig-05-saved-fails');
    await page.close();
  });

  it('names the three-way, basket and bridle-angle rules on screen as the path is edited, before anything is saved', async () => {
    const page = await browser.newPage();
    const tag = uniqueTag();
    const legA = await makeGear(MODELS.spanSet, `SSA-${tag}`);
    const legB = await makeGear(MODELS.spanSet, `SSB-${tag}`);
    const biner = await makeGear(MODELS.steelCarabiner, `CS-${tag}`);
    const fabric = await makeGear(MODELS.fabric, `FB-${tag}`);
    const label = `Q${tag}`;
    const pointId = await makePoint(tag, label, [legA, legB, biner, fabric]);

    await page.goto(`${baseUrl}/rig/points/${pointId}`);
    await page.getByRole('heading', { name: `Point ${label}` }).waitFor();
    await page.getByRole('button', { name: 'Edit load path' }).click();
    const row = checkRow(page.getByRole('region', { name: 'Preview of the load check (not saved)' }), 'Silks Foundations');
    await openRow(row);
    await until(() => summaryOf(row).innerText()).toContain('Passes');

    // Three strands into a carabiner that is not rated multi-directional.
    const threeWay = linkItem(page, biner).getByLabel('Takes a three-way load');
    await threeWay.check();
    const threeWayMessage = row.getByText(`${biner.name} takes a three-way load but is not rated multi-directional.`);
    await threeWayMessage.waitFor();
    expect(await threeWayMessage.innerText()).toContain('Use a tri or delta screw link, or a swivel base, rated for a three-way load.');
    await until(() => summaryOf(row).innerText()).toContain('Fails');
    await shot(page, 'rig-06-three-way');
    await threeWay.uncheck();
    await threeWayMessage.waitFor({ state: 'detached' });
    await until(() => summaryOf(row).innerText()).toContain('Passes');

    // Wide material filling the carabiner's basket past half.
    const basket = linkItem(page, biner).getByLabel('Wide material fills the basket past half');
    await basket.check();
    const basketMessage = row.getByText(`Wide material fills the basket of ${biner.name} past its halfway point`);
    await basketMessage.waitFor();
    expect(await basketMessage.innerText()).toContain('Use a screw link or a connector made for wide material.');
    await until(() => summaryOf(row).innerText()).toContain('Fails');
    await shot(page, 'rig-07-basket');
    await basket.uncheck();
    await basketMessage.waitFor({ state: 'detached' });

    // The two span sets become the legs of a bridle meeting in the carabiner, 130° apart: too wide.
    await linkItem(page, legA).getByLabel('Bridle leg').selectOption({ label: 'Leg a' });
    await linkItem(page, legB).getByLabel('Bridle leg').selectOption({ label: 'Leg b' });
    const angleA = linkItem(page, legA).getByLabel('Included angle (°)');
    const angleB = linkItem(page, legB).getByLabel('Included angle (°)');
    await angleA.fill('130');
    await angleB.fill('130');
    const tooWide = row.getByText(`The bridle meeting at ${biner.name} (link 3) has an included angle of 130°, above the 120° limit`);
    await tooWide.waitFor();
    expect(await tooWide.innerText()).toContain('Narrow the bridle.');
    await until(() => summaryOf(row).innerText()).toContain('Fails');
    await shot(page, 'rig-08-bridle-too-wide');

    // Narrowed to 100°: allowed, with a warning, and the check passes.
    await angleA.fill('100');
    await angleB.fill('100');
    const wideText = `The bridle meeting at ${biner.name} (link 3) has an included angle of 100°, wider than 90°`;
    const wide = row.getByText(wideText);
    await wide.waitFor();
    await tooWide.waitFor({ state: 'detached' });
    expect(await row.locator('li', { has: page.getByText(wideText) }).last().innerText()).toMatch(/^Warning:/);
    // The carabiner the legs meet in takes three strands by construction (§4.2): its three-way box
    // shows ticked and locked, and the check fails on it whatever was ticked.
    const meetingBox = linkItem(page, biner).getByLabel('Takes a three-way load');
    expect(await meetingBox.isChecked()).toBe(true);
    expect(await meetingBox.isDisabled()).toBe(true);
    await row.getByText(`${biner.name} takes a three-way load (the two bridle legs meet in it`).waitFor();
    await until(() => summaryOf(row).innerText()).toMatch(/Fails[\s\S]*1 warning/);
    // The leg tension appears in the working: T = W ÷ (2·cos 50°).
    await row.getByText('Show the working, step by step').click();
    const legRow = await row.getByRole('row').filter({ hasText: 'Bridle leg tension T = W ÷ (2·cos(θ/2))' }).innerText();
    expect(legRow).toContain(workingKn(silksDesignLoadKn() / (2 * Math.cos((50 * Math.PI) / 180))));
    await shot(page, 'rig-09-bridle-wide-warning');

    // None of it was saved.
    const stored = await api.get<{ links: Array<{ threeWay: boolean; basketOverHalf: boolean; leg: string | null }> }>(`/points/${pointId}`);
    expect(stored.links.map((l) => [l.threeWay, l.basketOverHalf, l.leg])).toEqual([[false, false, null], [false, false, null], [false, false, null], [false, false, null]]);
    await page.getByRole('button', { name: 'Cancel', exact: true }).click();
    await page.getByRole('button', { name: 'Edit load path' }).waitFor();
    await page.close();
  });

  it('stores ratings typed in lbf as kN', async () => {
    const page = await browser.newPage();
    const serial = `CS-LBF-${uniqueTag()}`;
    await page.goto(`${baseUrl}/rig/gear`);
    await page.getByRole('button', { name: 'Add a gear item' }).click();
    const form = page.getByRole('form', { name: 'Add a gear item' });
    await form.getByLabel('Kind').selectOption({ label: 'Carabiner' });
    await form.getByLabel('Material').selectOption({ label: 'Steel' });
    await form.getByLabel('Gate', { exact: true }).selectOption({ label: 'Screw gate' });
    await form.getByLabel('Serial or lot number').fill(serial);
    await form.getByRole('group', { name: 'Figures typed in' }).getByText('lbf', { exact: true }).click();
    const major = form.getByLabel('Breaking strength, major axis (lbf)');
    await major.fill('4950');
    await form.getByLabel('Minor axis (optional) (lbf)').fill('1575');
    // 4950 lbf × 4.4482216152605 N = 22.0187 kN; 1575 lbf = 7.0059 kN; a rating reads cut down.
    await form.getByText('Stored as 22.01 kN (from 4950 lbf).').waitFor();
    await form.getByText('Stored as 7.00 kN (from 1575 lbf).').waitFor();
    await shot(page, 'rig-10-gear-in-lbf');
    await form.getByRole('button', { name: 'Add item' }).click();

    await page.getByRole('heading', { name: `Carabiner ${serial}` }).waitFor();
    const id = Number(/\/rig\/gear\/(\d+)$/.exec(page.url())?.[1]);
    expect(id).toBeGreaterThan(0);
    const ratings = page.locator('dl > div');
    const majorShown = await ratings.filter({ has: page.locator('dt', { hasText: /^Breaking strength, major axis$/ }) }).locator('dd').innerText();
    const minorShown = await ratings.filter({ has: page.locator('dt', { hasText: /^Minor axis$/ }) }).locator('dd').innerText();
    expect(majorShown).toMatch(policy.units === 'kN' ? /^22\.0 kN$/ : /\(22\.01 kN\)$/);
    expect(minorShown).toMatch(policy.units === 'kN' ? /^7\.0 kN$/ : /\(7\.00 kN\)$/);
    const stored = await api.get<{ majorKn: number; minorKn: number }>(`/gear/${id}`);
    expect(stored.majorKn).toBeCloseTo((4950 * 4.4482216152605) / 1000, 6);
    expect(stored.minorKn).toBeCloseTo((1575 * 4.4482216152605) / 1000, 6);
    await shot(page, 'rig-11-gear-page-kn');
    await page.close();
  });

  it('prints a QR label for every point', async () => {
    const page = await browser.newPage();
    const points = await api.get<Array<{ id: number; label: string }>>('/points');
    expect(points.length).toBeGreaterThan(10);
    await page.goto(`${baseUrl}/rig/labels`);
    await page.getByRole('heading', { name: 'Labels' }).waitFor();
    await page.getByRole('group', { name: 'Labels to print' }).getByText('Points only', { exact: true }).click();
    await page.waitForURL(/which=points/);
    const sheet = page.getByRole('list', { name: 'Labels' });
    await until(() => sheet.getByRole('listitem').count()).toBe(points.length);
    for (const p of points) {
      const label = sheet.getByRole('listitem').filter({ has: page.getByText(p.label, { exact: true }) });
      const img = label.getByRole('img', { name: `QR code for ${p.label}` });
      await img.waitFor();
      expect(await img.getAttribute('src')).toMatch(/^data:image\/png;base64,/);
      expect(await img.evaluate((el) => (el as HTMLImageElement).complete && (el as HTMLImageElement).naturalWidth)).toBeGreaterThan(100);
      expect(await label.innerText()).toContain(`${baseUrl}/rig/points/${p.id}`);
    }
    expect(await sheet.getByRole('img', { name: /^QR code for / }).count()).toBe(points.length);
    await shot(page, 'rig-12-labels');
    await page.close();
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    expect(withoutRefusals(pageErrors, [])).toEqual([]);
  });
});
