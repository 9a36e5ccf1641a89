import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { launchBrowser, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, fillProviderSignIn } from '../support/sign-in';

let session: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];

beforeAll(async () => {
  session = await launchBrowser();
});
afterAll(() => session?.close());

async function freshPage(): Promise<Page> {
  await session.context.clearCookies();
  const page = await session.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${page.url()}: ${msg.text()}`);
  });
  return page;
}

const mainNav = (page: Page) => page.getByRole('navigation', { name: 'Main' });

describe('sign-in journeys', () => {
  it('a signed-out visitor to /patients is sent to sign-in and, after signing in, comes back there', async () => {
    const page = await freshPage();
    await page.goto(`${inject('baseUrl')}/patients`);
    await page.getByRole('heading', { name: 'Sign in to Ebbtide' }).waitFor();
    await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
    // The local identity provider's own page
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    expect(new URL(page.url()).origin).toBe(inject('issuer'));
    const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(font).toContain('Noto Sans');
    await page.screenshot({ path: path.join(screenshotDir, 'idp-sign-in.png'), fullPage: true });
    await fillProviderSignIn(page, DEMO_LOGINS.pharmacist);
    await page.getByRole('heading', { name: 'Patients' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/patients');
    await page.close();
  });

  it('the pharmacist sees the caseload, their name and role, and can sign out', async () => {
    const page = await freshPage();
    await page.goto(inject('baseUrl'));
    await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
    await fillProviderSignIn(page, DEMO_LOGINS.pharmacist);
    await page.getByRole('heading', { name: 'Caseload' }).waitFor();
    await expect(page.getByTestId('user-name').textContent()).resolves.toBe('Maren Okafor');
    await expect(page.getByTestId('user-role').textContent()).resolves.toBe('Pharmacist');
    for (const label of ['Caseload', 'Patients', 'Teaching cases']) {
      await expect(mainNav(page).getByRole('link', { name: label }).count()).resolves.toBe(1);
    }
    await expect(mainNav(page).getByRole('link', { name: 'Users' }).count()).resolves.toBe(0);
    await expect(
      page.getByRole('note', { name: 'Clinical caution' }).textContent(),
    ).resolves.toMatch(/clinical judgement/);
    await page.screenshot({
      path: path.join(screenshotDir, 'shell-pharmacist.png'),
      fullPage: true,
    });

    await page.getByRole('button', { name: 'Sign out' }).click();
    // The provider asks whether to end its session as well
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.getByRole('heading', { name: 'You are signed out' }).waitFor();
    const me = await page.evaluate(async () => (await fetch('/api/me')).status);
    expect(me).toBe(401);
    await page.close();
  });

  it('the trainee lands on Teaching cases, without Caseload/Patients/Review, and /patients is refused', async () => {
    const page = await freshPage();
    await page.goto(`${inject('baseUrl')}/sign-in`);
    await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
    await fillProviderSignIn(page, DEMO_LOGINS.trainee);
    await page.getByRole('heading', { name: 'Teaching cases' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/teaching');
    await expect(page.getByTestId('user-role').textContent()).resolves.toBe('Trainee');
    for (const label of ['Caseload', 'Patients', 'Review queue']) {
      await expect(mainNav(page).getByRole('link', { name: label }).count()).resolves.toBe(0);
    }
    await page.screenshot({ path: path.join(screenshotDir, 'shell-trainee.png'), fullPage: true });

    // Direct navigation: refused in the UI...
    await page.goto(`${inject('baseUrl')}/patients`);
    await page.getByRole('heading', { name: 'Not available to your role' }).waitFor();
    await expect(page.getByRole('heading', { name: 'Patients' }).count()).resolves.toBe(0);
    // ...and by the API, whatever the client does.
    // ...and by the API: whatever the URL, a trainee never receives an identifiable patient.
    const api = await page.evaluate(async () => {
      const res = await fetch('/api/patients');
      return { status: res.status, body: (await res.json()) as unknown };
    });
    if (api.status === 200) {
      const body = api.body as Record<string, unknown> | unknown[];
      const rows = (
        Array.isArray(body) ? body : (Object.values(body).find(Array.isArray) ?? [])
      ) as Array<{
        isTeaching?: boolean;
      }>;
      expect(rows.filter((r) => r.isTeaching !== true)).toEqual([]);
    } else {
      expect(api.status).toBe(403);
    }
    expect(await page.evaluate(async () => (await fetch('/api/users')).status)).toBe(403);
    await page.close();
  });

  it('shows no console errors along the way', () => {
    expect(consoleErrors.filter((e) => !/status of 40[13]/.test(e))).toEqual([]);
  });
});
