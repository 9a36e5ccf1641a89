import { existsSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { launchBrowser, screenshotDir } from '../support/browser';

let session: Awaited<ReturnType<typeof launchBrowser>>;
let page: Page;
const consoleErrors: string[] = [];

beforeAll(async () => {
  session = await launchBrowser();
  page = await session.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(msg.text());
  });
});
afterAll(() => session?.close());

describe('application shell', () => {
  it('shows the product name, the clinical caution and a connected database', async () => {
    await page.goto(inject('baseUrl'));
    await expect(page.getByText('Ebbtide', { exact: true }).first().isVisible()).resolves.toBe(
      true,
    );
    const caution = page.getByRole('note', { name: 'Clinical caution' });
    await expect(caution.textContent()).resolves.toMatch(/does not replace, clinical judgement/);
    await page.getByRole('status').getByText('Database connected').waitFor();

    const file = path.join(screenshotDir, 'shell.png');
    await page.screenshot({ path: file, fullPage: true });
    expect(existsSync(file) && statSync(file).size > 5000).toBe(true);
  });

  it('navigates to System status and shows the API version read from the server', async () => {
    await page.getByRole('link', { name: 'System status' }).click();
    await page.getByRole('heading', { name: 'System status' }).waitFor();
    await page.getByText('reachable', { exact: true }).waitFor();
    const version = await page.locator('dt:has-text("API version") + dd').textContent();
    expect(version).toMatch(/^\d+\.\d+\.\d+$/);
    await page.screenshot({ path: path.join(screenshotDir, 'status.png'), fullPage: true });
  });

  it('serves deep links through the client router', async () => {
    await page.goto(`${inject('baseUrl')}/status`);
    await page.getByRole('heading', { name: 'System status' }).waitFor();
    expect(consoleErrors).toEqual([]);
  });
});
