import { chromium, type BrowserContext, type Page } from 'playwright-core';
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

export async function openBrowser(viewport = DESKTOP): Promise<BrowserContext> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  return chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), 'loftwise-chromium-')), {
    executablePath: CHROMIUM,
    headless: true,
    args: FLAGS,
    viewport,
  });
}

export async function signInAs(page: Page, baseUrl: string, email: string, password = DEMO_PASSWORD) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('signed-in-as').first().waitFor({ state: 'attached' });
}

export const shot = (page: Page, name: string) => page.screenshot({ path: join(SCREENSHOTS, `${name}.png`), fullPage: true });
