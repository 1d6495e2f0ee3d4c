import AxeBuilder from '@axe-core/playwright';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { TZDate } from '@date-fns/tz';
import { mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
export const SCREENSHOTS = join(process.cwd(), 'tests/e2e/screenshots');
export const DEMO_PASSWORD = 'loftwise-demo';
export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1366, height: 900 };

// Flags that keep Debian's Chromium off the closed network and runnable as root.
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/**
 * Console errors and uncaught page errors of every page any `openBrowser` context of this test file
 * opened, each with its address. A file ends with `expect(withoutRefusals(pageErrors, […])).toEqual([])`.
 */
export const pageErrors: string[] = [];

export async function openBrowser(viewport = DESKTOP): Promise<BrowserContext> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  const context = await chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), 'loftwise-chromium-')), {
    executablePath: CHROMIUM,
    headless: true,
    args: FLAGS,
    viewport,
  });
  const watch = (p: Page) => {
    p.on('console', (m) => { if (m.type() === 'error') pageErrors.push(`${p.url()}: ${m.text()}`); });
    p.on('pageerror', (e) => pageErrors.push(`${p.url()}: ${e.message}`));
  };
  context.pages().forEach(watch);
  context.on('page', watch);
  return context;
}

/**
 * One Chromium for a whole file, for files that need many contexts (one per role and width): a new
 * context of a running browser costs milliseconds, a new browser seconds. Contexts made with
 * `contextIn` record console errors into `pageErrors` like `openBrowser`'s.
 */
export async function launchBrowser(): Promise<Browser> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  return chromium.launch({ executablePath: CHROMIUM, headless: true, args: FLAGS });
}

export async function contextIn(browser: Browser, viewport = DESKTOP, storageState?: Awaited<ReturnType<BrowserContext['storageState']>>): Promise<BrowserContext> {
  const context = await browser.newContext({ viewport, storageState });
  const watch = (p: Page) => {
    p.on('console', (m) => { if (m.type() === 'error') pageErrors.push(`${p.url()}: ${m.text()}`); });
    p.on('pageerror', (e) => pageErrors.push(`${p.url()}: ${e.message}`));
  };
  context.on('page', watch);
  return context;
}

/**
 * axe-core for `page`, set up to be quick without testing less: the same rules on the same DOM, but
 * run by axe.run inside the page ("legacy" mode) rather than per frame and then again in a blank
 * page that @axe-core/playwright opens for the purpose (the app has no cross-origin frames to reach,
 * only the Mailbox's sandboxed previews, which no script can enter either way), and with node details
 * kept only for violations (building a selector and an HTML excerpt for every passing node is most of
 * the cost on a big page). AXE_REPORT set keeps the passing and incomplete details for reading.
 */
export function axeFor(page: Page): AxeBuilder {
  const builder = new AxeBuilder({ page }).setLegacyMode(true);
  return process.env.AXE_REPORT ? builder : builder.options({ resultTypes: ['violations'] });
}

export async function signInAs(page: Page, baseUrl: string, email: string, password = DEMO_PASSWORD) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('signed-in-as').first().waitFor({ state: 'attached' });
}

export const shot = (page: Page, name: string) => page.screenshot({ path: join(SCREENSHOTS, `${name}.png`), fullPage: true });

/** A JSON call to the API with the page's cookies (and the Origin header the server wants on writes); throws with the body on any error. */
export async function apiCall<T = unknown>(page: Page, baseUrl: string, method: 'GET' | 'POST' | 'PUT' | 'PATCH', path: string, data?: unknown): Promise<T> {
  const res = await page.request.fetch(`${baseUrl}/api${path}`, { method, data, headers: { Origin: baseUrl } });
  const text = await res.text();
  if (!res.ok()) throw new Error(`${method} ${path} → ${res.status()}: ${text}`);
  return (text ? JSON.parse(text) : undefined) as T;
}

/**
 * A class start still to come today in the studio's zone, so the class is on today's board and can
 * still be booked: `leadMinutes` ahead (rounded up to the minute), nearer when the day ends sooner,
 * and never less than 3 minutes ahead; in the last 6 minutes of the day it waits for the next day
 * to begin (so a hook calling it allows 7 minutes). A fixed 20 minutes ahead fell on tomorrow from
 * about 23:35, and those files would have failed when CI ran late in the evening.
 */
export async function startSoonToday(leadMinutes = 20, timeZone = 'Europe/London'): Promise<Date> {
  for (;;) {
    const now = Date.now();
    const today = new TZDate(now, timeZone);
    const dayEnd = new TZDate(today.getFullYear(), today.getMonth(), today.getDate() + 1, timeZone).getTime();
    const lead = Math.min(leadMinutes * 60_000, Math.floor((dayEnd - now) / 2));
    if (lead >= 3 * 60_000) return new Date(Math.ceil((now + lead) / 60_000) * 60_000);
    await new Promise((r) => setTimeout(r, dayEnd - now + 5_000));
  }
}

/** The studio day `offset` days from today in `timeZone`, as 'YYYY-MM-DD'. */
export function studioDate(offset: number, timeZone = 'Europe/London'): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(Date.now() + offset * 86_400_000));
}

// ---- Helpers for tests that set up their own data (additions; the exports above are unchanged).

/** The JSON API with the signed-in page's cookies; writes carry the app's Origin, as a browser's would. */
export function apiOf(page: Page, baseUrl: string) {
  const url = (path: string) => `${baseUrl}/api${path}`;
  const headers = { Origin: baseUrl };
  const read = async <T>(res: Awaited<ReturnType<Page['request']['get']>>, what: string): Promise<T> => {
    if (!res.ok()) throw new Error(`${what} answered ${res.status()}: ${await res.text()}`);
    return (await res.json()) as T;
  };
  return {
    get: async <T = any>(path: string) => read<T>(await page.request.get(url(path)), `GET ${path}`),
    post: async <T = any>(path: string, data: unknown) => read<T>(await page.request.post(url(path), { data, headers }), `POST ${path}`),
    put: async <T = any>(path: string, data: unknown) => read<T>(await page.request.put(url(path), { data, headers }), `PUT ${path}`),
    /** The raw answer of a POST, for a caller ready to be refused (409 and the like). */
    tryPost: (path: string, data: unknown) => page.request.post(url(path), { data, headers }),
  };
}

/** A 16×16 chequered PNG: a real image, small enough for any upload limit. */
export const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAABAAAAAQCAIAAACQkWg2AAAAJElEQVR42mP48OAAHB0wUIAjXOIMg1ADMYqQxQejhtF4GBQaABS50BAryzEUAAAAAElFTkSuQmCC', 'base64');

/** A short tag unique to this run, so labels and serials never clash with the seed or another file's data. */
export const uniqueTag = () => `${Date.now().toString(36).slice(-4)}${Math.floor(Math.random() * 46656).toString(36).padStart(3, '0')}`.toUpperCase();

/** What the screen shows right now (not the full page): for a modal dialog, which a full-page shot cuts off. */
export const shotScreen = (page: Page, name: string) => page.screenshot({ path: join(SCREENSHOTS, `${name}.png`) });

/**
 * A rigging point of our own, for tests that change state: beam clamp, round sling, steel screwgate
 * and a fabric (a solo silks class passes the default factor of 5), cleared by the rigger unless
 * `clear` is false. `page` must be signed in as the rigger; serials are made from the label.
 */
export async function createFabricPoint(page: Page, baseUrl: string, { roomId, label, clear = true }: { roomId: number; label: string; clear?: boolean }): Promise<number> {
  const today = studioDate(0);
  const gear = (kind: string, serial: string, extra: Record<string, unknown>) =>
    apiCall<{ id: number }>(page, baseUrl, 'POST', '/gear', { kind, serial: `${label}-${serial}`, maker: 'Test Forge', model: kind, inServiceOn: today, serviceLifeYears: 8, multiDirectional: false, ...extra });
  const point = await apiCall<{ id: number }>(page, baseUrl, 'POST', '/points', { roomId, label, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric'], maxPerformers: 1 });
  const chain = [
    await gear('beam_clamp', 'BC', { material: 'steel', gate: 'none', majorKn: 50, wllKn: 10 }),
    await gear('round_sling', 'RS', { material: 'polyester', gate: 'none', majorKn: 40, wllKn: 8 }),
    await gear('carabiner', 'CS', { material: 'steel', gate: 'screw', majorKn: 45, minorKn: 14, gateOpenKn: 13 }),
    await gear('fabric', 'FB', { material: 'nylon', gate: 'none', majorKn: 28 }),
  ];
  await apiCall(page, baseUrl, 'PUT', `/points/${point.id}/load-path`, { links: chain.map((g) => ({ gearId: g.id, mode: 'major', threeWay: false, basketOverHalf: false })) });
  if (clear) {
    const { items } = await apiCall<{ items: Array<{ key: string }> }>(page, baseUrl, 'GET', `/points/${point.id}/checklist`);
    const r = await apiCall<{ cleared: boolean }>(page, baseUrl, 'POST', `/points/${point.id}/clearances`, { items: items.map((i) => ({ key: i.key, result: 'pass' })) });
    if (!r.cleared) throw new Error(`point ${label} did not clear`);
  }
  return point.id;
}

/**
 * Console errors and uncaught page errors of every page opened in a browser context, each with the
 * page's address. Call once right after `openBrowser`; a test then asserts the list is empty.
 */
export function watchConsole(context: BrowserContext): string[] {
  const errors: string[] = [];
  const watch = (p: Page) => {
    p.on('console', (m) => { if (m.type() === 'error') errors.push(`${p.url()}: ${m.text()}`); });
    p.on('pageerror', (e) => errors.push(`${p.url()}: ${e.message}`));
  };
  context.pages().forEach(watch);
  context.on('page', watch);
  return errors;
}

/**
 * Errors a test caused on purpose, not faults of a page: the browser logs every 4xx answer as a
 * console error ("Failed to load resource: … 409"), which a test of a refusal expects.
 */
export const withoutRefusals = (errors: string[], statuses: number[]) =>
  errors.filter((e) => !statuses.some((s) => e.includes(`Failed to load resource: the server responded with a status of ${s}`)));
