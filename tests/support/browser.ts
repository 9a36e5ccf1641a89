import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const screenshotDir = path.resolve(
  path.dirname(fileURLToPath(import.meta.url)),
  '../../test-output/screenshots',
);

/**
 * Debian's Chromium, headless, with the flags that keep it off the (closed) network.
 * Playwright gives every launch a fresh temporary profile of its own.
 */
export async function launchBrowser(): Promise<{
  browser: Browser;
  context: BrowserContext;
  close: () => Promise<void>;
}> {
  mkdirSync(screenshotDir, { recursive: true });
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const context = await browser.newContext({
    viewport: { width: 1280, height: 800 },
    locale: 'en-GB',
  });
  return {
    browser,
    context,
    close: async () => {
      await context.close();
      await browser.close();
    },
  };
}

/**
 * A browser with one page whose console errors are collected (a journey ends by asserting there were
 * none). Close `session` after the suite.
 */
export async function openJourneyPage(): Promise<{
  session: Awaited<ReturnType<typeof launchBrowser>>;
  page: Page;
  consoleErrors: string[];
}> {
  const session = await launchBrowser();
  const page = await session.context.newPage();
  const consoleErrors: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${page.url()}: ${msg.text()}`);
  });
  return { session, page, consoleErrors };
}
