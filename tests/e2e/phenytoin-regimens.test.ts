import path from 'node:path';
import { writeFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { api, createJourneyPatient } from '../support/api';
import { openJourneyPage, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, signInToCaseload } from '../support/sign-in';

let journey: Awaited<ReturnType<typeof openJourneyPage>>;
let page: Page;
const shot = (name: string) =>
  page.screenshot({ path: path.join(screenshotDir, `phenytoin-${name}.png`), fullPage: true });

const hour = 3_600_000;
let courseId = '';

beforeAll(async () => {
  journey = await openJourneyPage();
  page = journey.page;
});
afterAll(() => journey?.session.close());

describe('oral phenytoin in the regimen explorer (pharmacist)', () => {
  it('signs in and creates an oral phenytoin course through the API', async () => {
    await signInToCaseload(page, DEMO_LOGINS.pharmacist);
    const request = page.request;
    const patient = await createJourneyPatient(request, {
      givenName: 'Ansel',
      familyName: 'Drummond',
      sex: 'male',
      birthDate: '1971-09-02',
      ward: '6 West',
    });
    const observedAt = new Date(Date.now() - 80 * hour).toISOString();
    for (const c of [
      { kind: 'weight', value: 70, unit: 'kg', weightSource: 'measured' },
      { kind: 'serum-creatinine', value: 80, unit: 'umol/L' },
    ])
      await api(request, 'post', `/api/patients/${patient.id}/covariates`, { ...c, observedAt });
    const models = await api<{ items: { id: string }[] }>(
      request,
      'get',
      '/api/drug-models?drug=phenytoin',
    );
    const course = await api<{ id: string }>(
      request,
      'post',
      `/api/patients/${patient.id}/courses`,
      {
        drug: 'phenytoin',
        modelId: models.items[0]!.id,
        indication: 'Seizure prophylaxis after head injury',
        micMgL: null,
        // Total phenytoin 10–20 mg/L (pk-reference E3; common practice).
        target: { metric: 'trough', low: 10, high: 20 },
      },
    );
    courseId = course.id;
    for (const h of [72, 48, 24])
      await api(request, 'post', `/api/courses/${courseId}/doses`, {
        amount: 300,
        unit: 'mg',
        route: 'oral',
        startAt: new Date(Date.now() - h * hour).toISOString(),
      });
  });

  it('lists candidates given by mouth, and the what-if has no infusion time', async () => {
    await page.goto(`${inject('baseUrl')}/courses/${courseId}/regimens`);
    await page.getByRole('heading', { name: 'Candidate regimens' }).waitFor();
    const candidates = page.locator('table', {
      has: page.getByRole('columnheader', { name: 'AUC24' }),
    });
    const firstRow = candidates.locator('tbody tr').first();
    await firstRow.waitFor({ timeout: 30_000 });
    expect(await firstRow.textContent()).toMatch(/by mouth every \d+ h/);
    expect(await firstRow.textContent()).not.toMatch(/bolus/);
    await page.getByTestId('what-if-echo').waitFor();
    expect(await page.getByTestId('what-if-echo').textContent()).toMatch(/by mouth/);
    expect(await page.getByLabel('Infusion time (h)').count()).toBe(0);
  });

  it('proposes oral loading doses in portions when asked', async () => {
    await page.getByLabel('propose a loading dose with each regimen').check();
    const portions = page.getByText(/in \d portions, 2 h apart/).first();
    await portions.waitFor({ timeout: 30_000 });
    await shot('loading');
  });

  it('starts a draft plan by mouth, not as an IV bolus', async () => {
    await page.getByRole('button', { name: 'Use this regimen' }).click();
    const status = page.getByRole('status').filter({ hasText: /Draft plan/ });
    await status.waitFor({ timeout: 15_000 });
    expect(await status.textContent()).toMatch(/by mouth/);
    const plans = await api<{ items: { id: string }[] }>(
      page.request,
      'get',
      `/api/courses/${courseId}/plans`,
    );
    expect(plans.items).toHaveLength(1);
    const plan = await api<{ regimen: { route: string; doses: { label: string }[] } }>(
      page.request,
      'get',
      `/api/plans/${plans.items[0]!.id}`,
    );
    expect(plan.regimen.route).toBe('oral');
    // The loading dose proposed in portions is planned in the same portions.
    expect(plan.regimen.doses[0]!.label).toMatch(/^loading dose, part 1 of \d$/);
    const pdf = await page.request.get(
      `${inject('baseUrl')}/api/plans/${plans.items[0]!.id}/report.pdf`,
    );
    expect(pdf.ok()).toBe(true);
    writeFileSync(path.join(screenshotDir, 'phenytoin-plan.pdf'), await pdf.body());
    expect(journey.consoleErrors).toEqual([]);
  });
});
