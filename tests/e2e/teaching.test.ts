import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { drugModelLibrary } from '../../packages/kinetics/src/index';
import { createDb } from '../../apps/api/src/data-access/db';
import { insertTeachingCase } from '../../apps/api/src/data-access/teaching-repo';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import { buildTeachingCase, teachingSpecs } from '../../scripts/seed/teaching-cases';
import { launchBrowser, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, fillProviderSignIn } from '../support/sign-in';

let session: Awaited<ReturnType<typeof launchBrowser>>;
let page: Page;
const consoleErrors: string[] = [];
const shot = (name: string) =>
  page.screenshot({ path: path.join(screenshotDir, `teaching-${name}.png`), fullPage: true });

/** Dates, record numbers and the like that a trainee must never see. */
const IDENTIFIER = /\d{4}-\d{2}-\d{2}|\d{1,2}\/\d{1,2}\/\d{2,4}|\bMRN\b|KB-[0-9a-f]+/i;

// The test's own case, built by the server's own code from the early-trough case definition.
const spec = teachingSpecs.find((s) => s.pitfalls.some((p) => p.code === 'early-trough'));
if (!spec) throw new Error('no early-trough teaching case definition');
const title = `${spec.title} [${randomBytes(3).toString('hex')}]`;

beforeAll(async () => {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set');
  const db = createDb(url);
  try {
    await syncEngineLibrary(db, drugModelLibrary);
    await db.transaction((trx) => insertTeachingCase(trx, buildTeachingCase({ ...spec, title })));
  } finally {
    await db.destroy();
  }
  session = await launchBrowser();
  page = await session.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${page.url()}: ${msg.text()}`);
  });
});
afterAll(() => session?.close());

describe('teaching journey (trainee)', () => {
  it('signs in as the trainee and lands on the teaching cases', async () => {
    await page.goto(inject('baseUrl'));
    await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
    await fillProviderSignIn(page, DEMO_LOGINS.trainee);
    await page.getByRole('heading', { name: 'Teaching cases' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/teaching');
  });

  it('lists the case without names, record numbers or dates', async () => {
    const item = page.getByTestId('teaching-case').filter({ hasText: title });
    await item.waitFor();
    const text = (await page.getByRole('main').textContent()) ?? '';
    expect(text).not.toMatch(IDENTIFIER);
    await expect(item.textContent()).resolves.toMatch(/vancomycin/);
    await expect(item.textContent()).resolves.toMatch(/synthetic/);
    await shot('1-list');
  });

  it('opens the case: the record is in relative time, with the clinical-judgement caution', async () => {
    await page.getByRole('link', { name: title }).click();
    await page.getByRole('heading', { name: title }).waitFor();
    const record = page.getByRole('region', { name: 'Record (times from the first dose)' });
    // Hour 0 is the first dose, charted at 08:00 on day 1.
    await expect(
      record.getByText('Day 1 08:00', { exact: false }).count(),
    ).resolves.toBeGreaterThan(0);
    const text = (await page.getByRole('main').textContent()) ?? '';
    expect(text).not.toMatch(IDENTIFIER);
    await expect(
      page.getByRole('note', { name: 'Result caution' }).first().textContent(),
    ).resolves.toMatch(/clinical judgement/);
    await shot('2-case');
  });

  it('leaves out the early trough, flags the pitfall and submits a practice plan', async () => {
    // The "trough" of this case is drawn 4 h before the next dose, at hour 44 = day 2 04:00 + 24 h.
    await page.getByRole('checkbox', { name: 'Leave out the level at Day 3 04:00' }).check();
    await page.getByRole('checkbox', { name: 'Trough drawn too early' }).check();
    // Source: the case's own dosing (1250 mg over 1.5 h every 12 h), continued.
    await page.getByLabel('Dose (mg)').fill('1250');
    await page.getByLabel('Every (h)').fill('12');
    await page.getByLabel('Infusion (h)').fill('1.5');
    await page.getByLabel('Rationale').fill('The trough came with the morning bloods: left out.');
    await shot('3-plan');
    await page.getByRole('button', { name: 'Submit practice plan' }).click();
    await page.getByTestId('practice-score').waitFor();
  });

  it('reads the score: predicted against true AUC24, whether the target is met, the pitfall caught', async () => {
    const score = page.getByTestId('practice-score');
    const exposure = score.getByRole('table', { name: 'Exposure' });
    await expect(score.getByText(/^Score \d+\/100$/).count()).resolves.toBe(1);
    const auc = async (row: string) =>
      Number(
        (
          await exposure
            .getByRole('row', { name: new RegExp(`^${row}`) })
            .getByRole('cell')
            .nth(1)
            .textContent()
        )?.replace(/[^\d.]/g, ''),
      );
    const predicted = await auc('Your prediction');
    const truth = await auc('True patient');
    // Source: common practice — a vancomycin AUC24 on 1250 mg 12-hourly lies far inside 100–2000 mg·h/L.
    expect(predicted).toBeGreaterThan(100);
    expect(predicted).toBeLessThan(2000);
    expect(truth).toBeGreaterThan(100);
    expect(truth).toBeLessThan(2000);
    // Source: Rybak 2020 consensus, AUC24 400–600 mg·h/L (the case's target).
    await expect(score.getByText(/Target (met|not met) in the true patient/).count()).resolves.toBe(
      1,
    );
    const pitfalls = score.getByRole('list', { name: 'Pitfalls' });
    await expect(pitfalls.textContent()).resolves.toMatch(/caught\s*Trough drawn too early/);
    await shot('4-score');
  });

  it('shows the attempt under earlier attempts, and logged no console errors', async () => {
    const attempts = page.getByRole('region', { name: 'Earlier attempts' });
    await attempts.getByText(/1250 mg every 12 h/).waitFor();
    const text = (await attempts.textContent()) ?? '';
    expect(text).not.toMatch(IDENTIFIER);
    await shot('5-attempts');
    expect(consoleErrors).toEqual([]);
  });
});
