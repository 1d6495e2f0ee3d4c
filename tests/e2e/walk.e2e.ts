import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Browser, BrowserContext, Locator, Page } from 'playwright-core';
import { apiCall, axeFor, contextIn, createFabricPoint, DESKTOP, launchBrowser, PHONE, pageErrors, shot, shotScreen, signInAs, withoutRefusals } from './browser';

/*
 * The walk: every page, as each role that uses it, at the width that person uses (PRODUCT.md §9,
 * JOURNEYS.md): the desk and the owner at 1366 × 900, the rigger on a 1024 × 768 tablet, the
 * instructor and the student on a 390 × 844 phone, and the signed-out pages on a phone and at a
 * desk. Each page is visited once; on that visit it must finish loading with no console error,
 * axe-core must find nothing serious or critical, nothing may need sideways scrolling (WCAG 1.4.10
 * reflow), and a full-page screenshot goes to tests/e2e/screenshots/page-<role>-<path>.png (ignored
 * by git) to be looked at. Then the keyboard alone on the three pages people live in.
 *
 * One Chromium for the file, one context per role, signed in once (the keyboard tests reuse the
 * role's cookies). WALK_TIMING=1 prints how long each page took to load, audit and shoot;
 * AXE_REPORT=1 prints every page's rule counts (incomplete and minor ones too); AXE_REPORT=full
 * adds each node. Reads only, apart from the keyboard tests' own room, point and class, and the
 * demo student's sign-in link.
 */

const baseUrl = inject('baseUrl');
const BLOCKING = new Set(['serious', 'critical']);
const TABLET = { width: 1024, height: 768 };
const STUDENT = 'maya.okafor@students.test';

type Viewport = typeof DESKTOP;
type Role = 'owner' | 'reception' | 'instructor' | 'rigger' | 'student';
type StorageState = Awaited<ReturnType<BrowserContext['storageState']>>;

let browser: Browser;
const contexts: BrowserContext[] = [];
/** Each role's cookies once signed in, for the keyboard tests. */
const signedIn = new Map<Role, StorageState>();
// Filled in beforeAll: one real point, a gear item on it, and a demo student with bookings.
const ids = { point: 0, gear: 0, student: 0 };

async function contextFor(viewport: Viewport, state?: StorageState) {
  const c = await contextIn(browser, viewport, state);
  contexts.push(c);
  return c;
}

beforeAll(async () => {
  browser = await launchBrowser();
  const page = await (await contextFor(DESKTOP)).newPage();
  await signInAs(page, baseUrl, 'owner@loftwise.test');
  signedIn.set('owner', await page.context().storageState());
  const points = await apiCall<Array<{ id: number; label: string }>>(page, baseUrl, 'GET', '/points');
  const gear = await apiCall<Array<{ id: number; pointId: number | null }>>(page, baseUrl, 'GET', '/gear');
  ids.point = points.find((p) => p.label === 'MH-1')?.id ?? points[0].id;
  ids.gear = gear.find((g) => g.pointId === ids.point)?.id ?? gear[0].id;
  const students = await apiCall<{ items: Array<{ id: number; email: string }> }>(page, baseUrl, 'GET', '/students?limit=50');
  ids.student = (students.items.find((s) => s.email === STUDENT) ?? students.items[0]).id;
  await page.close();
}, 60_000);

afterAll(async () => {
  for (const c of contexts) await c.close().catch(() => undefined);
  await browser?.close();
});

interface Walk {
  role: Role | 'signed-out';
  viewport: Viewport;
  /** Staff sign in with their password; the student by the e-mailed link. */
  email?: string;
  pages: () => string[];
}

const walks: Walk[] = [
  {
    role: 'owner',
    email: 'owner@loftwise.test',
    viewport: DESKTOP,
    pages: () => ['/today', '/schedule', '/rig', '/rig/gear', `/rig/points/${ids.point}`, `/rig/gear/${ids.gear}`, '/rig/labels', '/inspections', '/faults', '/faults/new', '/students', `/students/${ids.student}`, '/class-types', '/staff', '/settings', '/mailbox', '/audit', '/account'],
  },
  {
    role: 'reception',
    email: 'reception@loftwise.test',
    viewport: DESKTOP,
    // The desk's own day; its other pages are the owner's at the same width, walked above.
    pages: () => ['/today', '/schedule', '/students', `/students/${ids.student}`],
  },
  {
    role: 'instructor',
    email: 'instructor@loftwise.test',
    viewport: PHONE,
    pages: () => ['/today', '/schedule', '/rig', '/faults', '/faults/new', '/students', `/students/${ids.student}`, '/account'],
  },
  {
    role: 'rigger',
    email: 'rigger@loftwise.test',
    viewport: TABLET,
    pages: () => ['/today', '/schedule', '/rig', `/rig/points/${ids.point}`, '/rig/gear', `/rig/gear/${ids.gear}`, '/rig/labels', '/inspections', '/faults', '/faults/new', '/account'],
  },
  { role: 'student', email: STUDENT, viewport: PHONE, pages: () => ['/my/bookings', '/my/waiver', '/my/account', '/timetable'] },
  { role: 'signed-out', viewport: PHONE, pages: () => ['/sign-in', '/timetable'] },
  { role: 'signed-out', viewport: DESKTOP, pages: () => ['/sign-in', '/timetable'] },
];

/**
 * API requests in flight on a page, counted from the browser's own events: the page has settled
 * when none is running and no spinner shows. This waits only as long as the data takes, where
 * Playwright's "networkidle" always adds half a second of silence and never comes on pages that poll.
 */
function trackRequests(page: Page) {
  const running = new Set<unknown>();
  const isApi = (r: { url(): string }) => r.url().startsWith(`${baseUrl}/api/`);
  page.on('request', (r) => { if (isApi(r)) running.add(r); });
  page.on('requestfinished', (r) => running.delete(r));
  page.on('requestfailed', (r) => running.delete(r));
  return running;
}

/** The page has its heading, no request in flight and no spinner, three checks running (~150 ms). */
async function settled(page: Page, running: Set<unknown>) {
  await page.locator('h1').first().waitFor();
  const deadline = Date.now() + 20_000;
  let calm = 0;
  while (calm < 3) {
    const spinning = await page.evaluate(() =>
      [...document.querySelectorAll('[role="status"] .animate-spin, [aria-busy="true"]')].some((e) => e.getClientRects().length > 0),
    );
    calm = running.size === 0 && !spinning ? calm + 1 : 0;
    if (Date.now() > deadline) throw new Error(`still loading at ${page.url()}: ${running.size} request(s) running${spinning ? ', a spinner showing' : ''}`);
    if (calm < 3) await page.waitForTimeout(50);
  }
  // The screenshot and the contrast check want the studio's font, not the fallback.
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
}

interface Finding {
  id: string;
  impact: string;
  help: string;
  targets: string[];
}

async function audit(page: Page): Promise<Finding[]> {
  const { violations, passes, incomplete } = await axeFor(page).analyze();
  if (process.env.AXE_REPORT) console.log(page.url(), 'passes', passes.length, 'incomplete', incomplete.map((v) => `${v.id}(${v.nodes.length})`).join(' '), 'violations', violations.map((v) => `${v.id}/${v.impact}(${v.nodes.length})`).join(' '));
  if (process.env.AXE_REPORT === 'full') for (const v of [...incomplete, ...violations]) for (const n of v.nodes.slice(0, 6)) console.log('   ', v.id, n.target.join(' '), '|', n.html.slice(0, 160), '|', (n.failureSummary ?? n.any.map((a) => a.message).join('; ')).slice(0, 600));
  return violations
    .filter((v) => BLOCKING.has(v.impact ?? ''))
    .map((v) => ({ id: v.id, impact: v.impact!, help: v.help, targets: v.nodes.map((n) => n.target.join(' ')) }));
}

/** WCAG 1.4.10 reflow: how far the page sticks out past the screen's right edge, and the elements that do. */
function overflow(page: Page): Promise<{ by: number; widest: string[] }> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const by = document.documentElement.scrollWidth - width;
    if (by <= 0) return { by, widest: [] };
    const widest = [...document.querySelectorAll('body *')]
      .filter((e) => e.getBoundingClientRect().right > width + 1)
      .filter((e) => !e.parentElement || e.parentElement.getBoundingClientRect().right <= width + 1)
      .slice(0, 5)
      .map((e) => `${e.tagName.toLowerCase()}${e.id ? `#${e.id}` : ''}.${[...e.classList].slice(0, 4).join('.')}`);
    return { by, widest };
  });
}

const readable = (where: string, found: Finding[]) =>
  found.map((f) => `${where}: [${f.impact}] ${f.id} — ${f.help}\n${f.targets.map((t) => `      ${t}`).join('\n')}`).join('\n');

const shotName = (role: string, width: number, path: string) =>
  `page-${role}${role === 'signed-out' ? `-${width}` : ''}-${path.replace(/^\//, '').replace(/[/?=&]+/g, '-') || 'home'}`;

/** The student's sign-in link, read from the built-in mail catcher with the owner's cookies. */
async function studentLink(owner: Page, email: string): Promise<string> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const all = await apiCall<Array<{ to: string[]; subject: string; text: string }>>(owner, baseUrl, 'GET', `/dev/mailbox?to=${encodeURIComponent(email)}`);
    const link = all
      .filter((m) => /sign-in link/i.test(m.subject))
      .at(-1)
      ?.text.match(/https?:\/\/\S+\/auth\/callback\/nodemailer\?\S+/)?.[0];
    if (link) return link;
    if (Date.now() > deadline) throw new Error(`no sign-in link for ${email} reached the mailbox`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

async function signIn(walk: Walk, page: Page) {
  if (walk.role === 'signed-out') return;
  if (walk.role !== 'student') {
    await signInAs(page, baseUrl, walk.email!);
  } else {
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel('Your e-mail').fill(walk.email!);
    const asked = Date.now();
    await page.getByRole('button', { name: 'E-mail me a link' }).click();
    await page.getByRole('heading', { name: 'Check your e-mail' }).waitFor();
    const owner = await (await contextFor(DESKTOP, signedIn.get('owner'))).newPage();
    const link = await studentLink(owner, walk.email!);
    await owner.close();
    await page.goto(link);
    await page.getByRole('navigation', { name: 'Your pages' }).waitFor();
    if (process.env.WALK_TIMING) console.log(`student sign-in link arrived in ${Date.now() - asked} ms`);
  }
  signedIn.set(walk.role, await page.context().storageState());
}

describe('every page, once per role at its width: loads, axe, reflow, no console error, a screenshot', () => {
  for (const walk of walks) {
    const width = walk.viewport.width;
    it(`${walk.role} at ${width}px`, async () => {
      const context = await contextFor(walk.viewport);
      const page = await context.newPage();
      const running = trackRequests(page);
      const errorsBefore = pageErrors.length;
      await signIn(walk, page);
      const problems: string[] = [];
      const timing: string[] = [];
      for (const path of walk.pages()) {
        const t0 = Date.now();
        await page.goto(`${baseUrl}${path}`);
        await settled(page, running);
        const t1 = Date.now();
        const where = `${walk.role} @${width} ${path}`;
        for (const wrong of ['There is no page at this address', 'This page is not part of your role']) {
          if (await page.getByText(wrong).count()) problems.push(`${where}: "${wrong}"`);
        }
        const found = await audit(page);
        const t2 = Date.now();
        const { by, widest } = await overflow(page);
        if (by > 0) found.push({ id: 'reflow', impact: 'serious', help: `The page is ${by}px wider than the ${width}px screen`, targets: widest });
        if (found.length) problems.push(readable(where, found));
        await shot(page, shotName(walk.role, width, path));
        timing.push(`${path} load ${t1 - t0} axe ${t2 - t1} shot ${Date.now() - t2}`);
      }
      if (process.env.WALK_TIMING) console.log(`${walk.role} @${width}\n  ${timing.join('\n  ')}`);
      await page.close();
      expect(problems.join('\n'), `\n${problems.join('\n')}`).toBe('');
      expect(withoutRefusals(pageErrors.slice(errorsBefore), [])).toEqual([]);
    }, 240_000);
  }
});

// ---- the keyboard alone

/** Presses Tab until `target` has the focus; the trail of focused elements explains a failure. */
async function tabTo(page: Page, target: Locator, max = 200) {
  const trail: string[] = [];
  for (let i = 0; i < max; i++) {
    await page.keyboard.press('Tab');
    if (await target.evaluate((el) => el === document.activeElement).catch(() => false)) return;
    trail.push(await page.evaluate(() => {
      const el = document.activeElement as HTMLElement | null;
      return el ? `${el.tagName.toLowerCase()} "${(el.getAttribute('aria-label') ?? el.innerText ?? '').trim().replace(/\s+/g, ' ').slice(0, 40)}"` : 'none';
    }));
  }
  throw new Error(`Tab never reached the target after ${max} presses. Focus went:\n  ${trail.slice(-40).join('\n  ')}`);
}

const focused = (page: Page) => page.evaluate(() => (document.activeElement as HTMLElement | null)?.innerText?.trim().replace(/\s+/g, ' ') ?? '');

/** A page in a new context with `role`'s cookies from the walk (or a fresh sign-in if the walk did not get that far). */
async function pageAs(role: Role, email: string, viewport: Viewport) {
  const page = await (await contextFor(viewport, signedIn.get(role))).newPage();
  if (!signedIn.has(role)) await signInAs(page, baseUrl, email);
  return page;
}

/** Opens `path` and waits until its data is in. */
async function open(page: Page, path: string) {
  const running = trackRequests(page);
  await page.goto(`${baseUrl}${path}`);
  await settled(page, running);
}

describe('the keyboard reaches and works the main actions', () => {
  // A class running now, in a room of its own, so Today has a pre-use check to do whatever the hour.
  const live = { email: '', className: '', point: 'KB-1' };

  beforeAll(async () => {
    const rigger = await pageAs('rigger', 'rigger@loftwise.test', DESKTOP);
    const roomId = (await apiCall<{ id: number }>(rigger, baseUrl, 'POST', '/rooms', { name: 'Keyboard Test Room' })).id;
    const pointId = await createFabricPoint(rigger, baseUrl, { roomId, label: live.point });
    await rigger.close();

    const desk = await pageAs('reception', 'reception@loftwise.test', DESKTOP);
    const types = await apiCall<Array<{ id: number; name: string; apparatus: string }>>(desk, baseUrl, 'GET', '/class-types');
    const type = types.find((t) => t.apparatus === 'fabric')!;
    live.className = type.name;
    const users = await apiCall<Array<{ id: number; email: string; role: string; active: boolean }>>(desk, baseUrl, 'GET', '/users');
    // Started five minutes ago (so it is today whatever the hour), with whichever demo instructor is free now.
    const minute = Math.floor(Date.now() / 60_000) * 60_000;
    const when = { startsAt: new Date(minute - 5 * 60_000).toISOString(), endsAt: new Date(minute + 55 * 60_000).toISOString() };
    const order = ['piet.arlo@loftwise.test', 'juno.vale@loftwise.test', 'instructor@loftwise.test'];
    const candidates = users.filter((u) => u.role === 'instructor' && u.active).sort((a, b) => (order.indexOf(a.email) + 1 || 99) - (order.indexOf(b.email) + 1 || 99));
    for (const u of candidates) {
      try {
        await apiCall(desk, baseUrl, 'POST', '/sessions', { classTypeId: type.id, instructorId: u.id, roomId, pointIds: [pointId], ...when });
        live.email = u.email;
        break;
      } catch {
        /* teaching now: try the next one */
      }
    }
    await desk.close();
    if (!live.email) throw new Error('no demo instructor was free to teach the keyboard test class');
  }, 60_000);

  it('on Today (instructor, phone): Tab reaches the pre-use check and “Report a fault”, and Enter opens each', async () => {
    const page = await (await contextFor(PHONE, live.email === 'instructor@loftwise.test' ? signedIn.get('instructor') : undefined)).newPage();
    if (!(live.email === 'instructor@loftwise.test' && signedIn.has('instructor'))) await signInAs(page, baseUrl, live.email);
    await open(page, '/today');
    const card = page.getByRole('article', { name: live.className }).filter({ hasText: live.point });
    const check = card.getByRole('button', { name: `Do the pre-use check for ${live.point}` });
    const report = card.getByRole('button', { name: `Report a fault on ${live.point}` });

    await tabTo(page, check);
    await tabTo(page, report, 5);
    await page.keyboard.press('Enter');
    const dialog = page.getByRole('dialog', { name: `Report a fault on ${live.point}` });
    await dialog.waitFor();
    expect(await dialog.evaluate((d) => d.contains(document.activeElement))).toBe(true);
    await shotScreen(page, 'a11y-keyboard-today-fault');
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'hidden' });

    await check.focus();
    await page.keyboard.press('Enter');
    await card.getByRole('heading', { name: `Pre-use check: ${live.point}` }).waitFor();
    expect(await focused(page)).toContain(`Pre-use check: ${live.point}`);
    await shot(page, 'a11y-keyboard-today-preuse');
  });

  it('on Schedule (reception, desktop): Tab reaches the agenda past the calendar, and Enter opens a class', async () => {
    const page = await pageAs('reception', 'reception@loftwise.test', DESKTOP);
    await open(page, '/schedule');
    await tabTo(page, page.getByRole('button', { name: 'Book a class' }));
    // The skip link jumps the calendar: the next Tab lands in the agenda.
    await tabTo(page, page.getByRole('link', { name: 'Skip the calendar to the agenda list' }));
    await page.keyboard.press('Enter');
    const agenda = page.getByRole('region', { name: /^Agenda/ });
    const item = agenda.getByRole('button').filter({ hasText: live.className }).first();
    await tabTo(page, item, 60);
    const label = await focused(page);
    await page.keyboard.press('Enter');
    const drawer = page.getByRole('dialog');
    await drawer.getByRole('region', { name: 'Booked points' }).waitFor();
    expect(await drawer.evaluate((d) => d.contains(document.activeElement))).toBe(true);
    expect(label).toContain(await drawer.getByRole('heading', { level: 2 }).first().innerText());
    await shotScreen(page, 'a11y-keyboard-schedule-drawer');
    await page.keyboard.press('Escape');
    await drawer.waitFor({ state: 'hidden' });
    // Focus goes back to the class that was opened.
    expect(await item.evaluate((el) => el === document.activeElement)).toBe(true);
  });

  it('on Rig (rigger, tablet): Tab reaches a point, and Enter opens its page', async () => {
    const page = await pageAs('rigger', 'rigger@loftwise.test', TABLET);
    await open(page, '/rig');
    const first = page.getByRole('main').locator('a[href^="/rig/points/"]').first();
    await tabTo(page, first);
    const href = (await first.getAttribute('href'))!;
    const running = trackRequests(page);
    await page.keyboard.press('Enter');
    await page.waitForURL(`**${href}`);
    await settled(page, running);
    await shot(page, 'a11y-keyboard-rig-point');
  });
});

describe('the browser console', () => {
  it('showed no error on any page this file opened', () => {
    expect(withoutRefusals(pageErrors, [])).toEqual([]);
  });
});
