import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { drugModelLibrary, vancomycinGoti2018 } from '../../packages/kinetics/src/index';
import { createDb } from '../../apps/api/src/data-access/db';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import { launchBrowser, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, fillProviderSignIn } from '../support/sign-in';

let session: Awaited<ReturnType<typeof launchBrowser>>;
let page: Page;
const consoleErrors: string[] = [];
const shot = (name: string) =>
  page.screenshot({ path: path.join(screenshotDir, `drug-models-${name}.png`), fullPage: true });

async function signInAs(login: string) {
  await session.context.clearCookies();
  await page.goto(inject('baseUrl'));
  await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
  await fillProviderSignIn(page, login);
  await page.getByRole('navigation', { name: 'Main' }).waitFor();
}

beforeAll(async () => {
  // Reference data, not demo data: the drug-model library the server also syncs from the engine.
  if (process.env.DATABASE_URL) {
    const db = createDb(process.env.DATABASE_URL);
    try {
      await syncEngineLibrary(db, drugModelLibrary);
    } finally {
      await db.destroy();
    }
  }
  session = await launchBrowser();
  page = await session.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${page.url()}: ${msg.text()}`);
  });
});
afterAll(() => session?.close());

describe('drug models (trainee reads, admin adds a version)', () => {
  it('lists the library with structure, elimination and source', async () => {
    await signInAs(DEMO_LOGINS.trainee);
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Drug models' })
      .click();
    await page.getByRole('heading', { name: 'Drug models' }).waitFor();
    const row = page.getByRole('row').filter({ hasText: vancomycinGoti2018.id });
    await row.waitFor();
    // Source: the engine's library entry (Goti 2018, two-compartment, linear elimination).
    await expect(row.textContent()).resolves.toMatch(/2-compartment/);
    await expect(row.textContent()).resolves.toMatch(/linear/);
    await expect(row.textContent()).resolves.toMatch(/Goti/);
    const phenytoin = page.getByRole('row').filter({ hasText: /phenytoin/i });
    await expect(phenytoin.first().textContent()).resolves.toMatch(/Michaelis-Menten/);
    await shot('list');
  });

  it('shows one model: typical values, relations, variability, covariate ranges, sources and the from-memory marker', async () => {
    await page.getByRole('link', { name: vancomycinGoti2018.title }).click();
    await page.getByRole('heading', { name: vancomycinGoti2018.title }).waitFor();
    const typical = page.getByRole('region', { name: 'Typical values and covariate relations' });
    // Source: Goti 2018 as carried by the engine's library (CL 4.5 L/h, relation on CrCl and HD; from memory in part).
    const cl = typical.getByRole('row').filter({ hasText: 'Clearance CL' });
    await expect(cl.textContent()).resolves.toMatch(/4\.5 L\/h/);
    await expect(cl.textContent()).resolves.toMatch(/THETA \* \(CRCL \/ 120\)\^0\.8 \* 0\.7\^HD/);
    await expect(cl.textContent()).resolves.toMatch(/from memory — verify before clinical use/);
    const bsv = page.getByRole('region', { name: 'Between-subject variability' });
    // Source: the library's placeholder CV 40 % for CL (from memory); ω = √ln(1 + 0.4²) ≈ 0.385.
    const clBsv = bsv.getByRole('row').filter({ hasText: 'Clearance CL' });
    await expect(clBsv.textContent()).resolves.toMatch(/0\.385/);
    await expect(clBsv.textContent()).resolves.toMatch(/40%/);
    const ranges = page.getByRole('region', { name: 'Covariate ranges' });
    // Source: the library's CrCl range for the model, 5–150 mL/min (from memory).
    await expect(
      ranges.getByRole('row').filter({ hasText: 'CRCL' }).textContent(),
    ).resolves.toMatch(/5–150 mL\/min/);
    const practical = page.getByRole('region', { name: 'Practical settings' });
    // Source: common practice, 250 mg rounding; Rybak 2020 AUC24 400–600 at MIC 1 mg/L.
    await expect(practical.textContent()).resolves.toMatch(/to 250 mg/);
    await expect(practical.textContent()).resolves.toMatch(/AUC24 400–600 mg·h\/L at MIC 1 mg\/L/);
    await expect(page.getByRole('region', { name: 'Add a model version' }).count()).resolves.toBe(
      0,
    );
    await shot('detail');
  });

  it('admin: a model body the engine refuses shows its problems beside the form, and nothing typed is lost', async () => {
    await signInAs(DEMO_LOGINS.admin);
    await page.goto(`${inject('baseUrl')}/drug-models/${vancomycinGoti2018.id}`);
    const form = page.getByRole('region', { name: 'Add a model version' });
    await form.waitFor();
    const id = `vancomycin-site-${randomBytes(3).toString('hex')}`;
    const body = JSON.parse(JSON.stringify(vancomycinGoti2018)) as Record<string, unknown> & {
      parameters: { CL: { typical: number } };
    };
    body.id = id;
    body.parameters.CL.typical = -1;
    await form.getByLabel('Model id').fill(id);
    await form.getByLabel('Name').fill('Vancomycin, site copy for checking');
    await form.getByLabel('Model body (JSON)').fill(JSON.stringify(body, null, 2));
    await form.getByRole('button', { name: 'Save the model version' }).click();
    const problems = form.getByRole('list', { name: 'Problems in the model body' });
    await problems.waitFor();
    await expect(problems.textContent()).resolves.toMatch(/CL/);
    await expect(form.getByLabel('Model id').inputValue()).resolves.toBe(id);
    await expect(form.getByLabel('Name').inputValue()).resolves.toBe(
      'Vancomycin, site copy for checking',
    );
    await expect(form.getByLabel('Model body (JSON)').inputValue()).resolves.toMatch(
      /"typical": -1/,
    );
    await shot('admin-refused');

    // Correct the one number and save: the new model opens at version 1.
    body.parameters.CL.typical = 4.5;
    await form.getByLabel('Model body (JSON)').fill(JSON.stringify(body, null, 2));
    await form.getByRole('button', { name: 'Save the model version' }).click();
    await page.getByRole('heading', { name: /Vancomycin, site copy for checking/ }).waitFor();
    expect(new URL(page.url()).pathname).toBe(`/drug-models/${id}`);
    await shot('admin-saved');
    expect(consoleErrors.filter((e) => !/status of 400/.test(e))).toEqual([]);
  });
});
