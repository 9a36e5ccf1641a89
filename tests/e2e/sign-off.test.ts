import { execFileSync } from 'node:child_process';
import { existsSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import { api } from '../support/api';
import { drugModelLibrary, vancomycinGoti2018 } from '../../packages/kinetics/src/index';
import { createDb } from '../../apps/api/src/data-access/db';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import { launchBrowser, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, fillProviderSignIn } from '../support/sign-in';

let session: Awaited<ReturnType<typeof launchBrowser>>;
let reviewerContext: BrowserContext;
let pharmacistPage: Page;
let reviewerPage: Page;
const hour = 3_600_000;
const ago = (h: number) => new Date(Date.now() - h * hour).toISOString();
let courseId = '';
let planId = '';

async function signIn(page: Page, login: string) {
  await page.goto(inject('baseUrl'));
  await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
  await fillProviderSignIn(page, login);
  await page.waitForURL((u) => !u.href.includes('/interaction/'));
}

beforeAll(async () => {
  if (process.env.DATABASE_URL) {
    const db = createDb(process.env.DATABASE_URL);
    try {
      await syncEngineLibrary(db, drugModelLibrary);
    } finally {
      await db.destroy();
    }
  }
  session = await launchBrowser();
  pharmacistPage = await session.context.newPage();
  reviewerContext = await session.browser.newContext({
    viewport: { width: 1280, height: 900 },
    locale: 'en-GB',
    acceptDownloads: true,
  });
  reviewerPage = await reviewerContext.newPage();
});
afterAll(async () => {
  await reviewerContext?.close();
  await session?.close();
});

describe('sign-off journey', () => {
  it('the reviewer and the pharmacist sign in', async () => {
    await signIn(reviewerPage, DEMO_LOGINS.reviewer);
    await signIn(pharmacistPage, DEMO_LOGINS.pharmacist);
  });

  it('the pharmacist drafts a plan for a course of their own and submits it', async () => {
    const request = pharmacistPage.request;
    const patient = await api<{ id: string }>(request, 'post', '/api/patients', {
      isTeaching: false,
      mrn: `KB-${randomBytes(4).toString('hex')}`,
      givenName: 'Wren',
      familyName: `Castellane-${randomBytes(2).toString('hex')}`,
      sex: 'female',
      birthDate: '1955-09-02',
      ward: 'Renal unit',
    });
    for (const c of [
      { kind: 'weight', value: 74, unit: 'kg', weightSource: 'measured', observedAt: ago(30) },
      { kind: 'height', value: 168, unit: 'cm', observedAt: ago(30) },
      { kind: 'serum-creatinine', value: 88, unit: 'umol/L', observedAt: ago(29) },
    ]) {
      await api(request, 'post', `/api/patients/${patient.id}/covariates`, c);
    }
    const course = await api<{ id: string }>(
      request,
      'post',
      `/api/patients/${patient.id}/courses`,
      {
        drug: 'vancomycin',
        modelId: vancomycinGoti2018.id,
        indication: 'MRSA bacteraemia',
        micMgL: 1,
        target: { metric: 'auc24', low: 400, high: 600 },
        startedAt: ago(25),
      },
    );
    courseId = course.id;
    for (const h of [24, 12]) {
      await api(request, 'post', `/api/courses/${courseId}/doses`, {
        amount: 1000,
        unit: 'mg',
        route: 'iv-infusion',
        startAt: ago(h),
        infusionMinutes: 60,
      });
    }
    await api(request, 'post', `/api/courses/${courseId}/levels`, {
      value: 24.1,
      unit: 'mg/L',
      collectedAt: ago(10),
      sampleKind: 'peak',
    });
    await api(request, 'post', `/api/courses/${courseId}/levels`, {
      value: 9.8,
      unit: 'mg/L',
      collectedAt: ago(0.6),
      sampleKind: 'trough',
    });
    const plan = await api<{ id: string }>(request, 'post', `/api/courses/${courseId}/plans`, {
      doseMg: 1250,
      intervalH: 12,
      infusionH: 1.5,
      route: 'iv-infusion',
      count: 6,
      rationale: 'Trough below the AUC target band; step up to 1250 mg 12-hourly.',
    });
    planId = plan.id;
    await pharmacistPage.goto(`${inject('baseUrl')}/courses/${courseId}/plans/${planId}`);
    await pharmacistPage.getByRole('heading', { name: /Dosing plan, version 1/ }).waitFor();
    await expect(pharmacistPage.getByTestId('clinical-caution').first().isVisible()).resolves.toBe(
      true,
    );
    await pharmacistPage.getByRole('button', { name: 'Submit for countersignature' }).click();
    await pharmacistPage.getByTestId('plan-state').filter({ hasText: 'Submitted' }).waitFor();
    await expect(pharmacistPage.getByTestId('signature').first().textContent()).resolves.toMatch(
      /authored/,
    );
    await pharmacistPage.screenshot({
      path: path.join(screenshotDir, 'sign-off-submitted.png'),
      fullPage: true,
    });
  });

  it('the reviewer receives the e-mail at the mail catcher', async () => {
    const deadline = Date.now() + 20_000;
    let found: { subject: string; text: string } | undefined;
    while (!found && Date.now() < deadline) {
      const res = await fetch(`${inject('mailCatcherUrl')}/messages`);
      const messages = (await res.json()) as Array<{ subject: string; text: string; to: string[] }>;
      found = messages.find((m) => m.text.includes(planId) && /countersignature/.test(m.subject));
      if (!found) await new Promise((r) => setTimeout(r, 300));
    }
    expect(found, 'submitted mail').toBeDefined();
    expect(found!.text).toContain(`/courses/${courseId}/plans/${planId}`);
  });

  it('the reviewer opens the queue, ticks the checklist and countersigns', async () => {
    await reviewerPage.goto(`${inject('baseUrl')}/reviews`);
    await reviewerPage.getByRole('heading', { name: 'Review queue' }).waitFor();
    const row = reviewerPage.getByTestId('queue-row').filter({ hasText: 'CASTELLANE' });
    await row.first().waitFor();
    await row.first().getByRole('link', { name: 'Review' }).click();
    await reviewerPage.getByRole('heading', { name: /Review plan version 1/ }).waitFor();
    const sign = reviewerPage.getByRole('button', { name: /Countersign/ });
    await expect(sign.isDisabled()).resolves.toBe(true);
    for (const label of [
      'Weight and its date',
      'Administration times',
      'Sample timing',
      'Fit plausibility',
      'Rounding and infusion rate',
    ]) {
      await reviewerPage.getByLabel(label).check();
    }
    await sign.click();
    await reviewerPage.getByTestId('review-outcome').filter({ hasText: 'countersigned' }).waitFor();
    await reviewerPage.screenshot({
      path: path.join(screenshotDir, 'sign-off-countersigned.png'),
      fullPage: true,
    });
  });

  it('the plan shows both signatures and downloads as a PDF that renders', async () => {
    await reviewerPage.goto(`${inject('baseUrl')}/courses/${courseId}/plans/${planId}`);
    await reviewerPage.getByTestId('plan-state').filter({ hasText: 'Countersigned' }).waitFor();
    const links = await reviewerPage.getByTestId('signature-link').allTextContents();
    expect(links).toHaveLength(2);
    expect(links.every((t) => t.includes('Signature matches content'))).toBe(true);
    const [download] = await Promise.all([
      reviewerPage.waitForEvent('download'),
      reviewerPage.getByRole('link', { name: 'Download PDF' }).click(),
    ]);
    const pdf = path.join(screenshotDir, 'sign-off-plan.pdf');
    await download.saveAs(pdf);
    const text = execFileSync('pdftotext', ['-layout', pdf, '-'], { encoding: 'utf8' });
    expect(text).toMatch(/does not replace,\s+clinical judgement/);
    expect(text).toMatch(/reviewed – agree/);
    expect(text).toMatch(/authored/);
    expect(text).toMatch(/1\.25 g \(1,250 mg\)/);
    const prefix = path.join(screenshotDir, 'sign-off-plan');
    execFileSync('pdftoppm', ['-png', '-r', '60', '-f', '1', '-l', '1', pdf, prefix]);
    const png = [`${prefix}-1.png`, `${prefix}-01.png`].find((p) => existsSync(p));
    expect(png, 'rendered first page').toBeDefined();
    expect(statSync(png!).size).toBeGreaterThan(10_000);
    writeFileSync(path.join(screenshotDir, 'sign-off-plan.txt'), text);
  });
});
