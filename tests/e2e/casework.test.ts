import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { api, createJourneyPatient } from '../support/api';
import { openJourneyPage, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, signInToCaseload } from '../support/sign-in';

let journey: Awaited<ReturnType<typeof openJourneyPage>>;
let page: Page;
const shot = (name: string) =>
  page.screenshot({ path: path.join(screenshotDir, `casework-${name}.png`), fullPage: true });

/** A datetime-local value in the browser's (= this machine's) time zone. */
function localInput(d: Date): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

// The test's own patient, course and doses: three 1 g infusions over 1 h, 12 h apart, the first 30 h ago.
const hour = 3_600_000;
const firstDose = new Date(Math.floor((Date.now() - 30 * hour) / (15 * 60_000)) * 15 * 60_000);
let patientId = '';
let courseId = '';
let familyName = '';

beforeAll(async () => {
  // The drug-model library is reference data: the server syncs it from the engine at start-up.
  journey = await openJourneyPage();
  page = journey.page;
});
afterAll(() => journey?.session.close());

describe('casework journey (pharmacist, vancomycin)', () => {
  it('signs in as the pharmacist', async () => {
    await signInToCaseload(page, DEMO_LOGINS.pharmacist);
  });

  it('creates its own patient, covariates, course and doses through the API', async () => {
    const request = page.request;
    const patient = await createJourneyPatient(request, {
      givenName: 'Odile',
      familyName: 'Tarrant',
      sex: 'female',
      birthDate: '1958-03-14',
      ward: '4 North',
    });
    patientId = patient.id;
    familyName = patient.familyName;
    const observedAt = new Date(firstDose.getTime() - 2 * hour).toISOString();
    for (const c of [
      { kind: 'weight', value: 72, unit: 'kg', weightSource: 'measured' },
      { kind: 'height', value: 165, unit: 'cm' },
      { kind: 'serum-creatinine', value: 88, unit: 'umol/L' },
    ]) {
      await api(request, 'post', `/api/patients/${patientId}/covariates`, { ...c, observedAt });
    }
    const models = await api<{ items: { id: string }[] }>(
      request,
      'get',
      '/api/drug-models?drug=vancomycin',
    );
    expect(models.items.length).toBeGreaterThan(0);
    const course = await api<{ id: string }>(
      request,
      'post',
      `/api/patients/${patientId}/courses`,
      {
        drug: 'vancomycin',
        modelId: models.items[0]!.id,
        indication: 'MRSA bacteraemia',
        micMgL: 1,
        micMethod: 'broth microdilution',
        // Source: Rybak et al. 2020 vancomycin consensus guideline (AUC24 400–600 for MIC 1 mg/L).
        target: { metric: 'auc24', low: 400, high: 600 },
      },
    );
    courseId = course.id;
    for (let i = 0; i < 3; i++) {
      await api(request, 'post', `/api/courses/${courseId}/doses`, {
        amount: 1,
        unit: 'g',
        route: 'iv-infusion',
        startAt: new Date(firstDose.getTime() + i * 12 * hour).toISOString(),
        infusionMinutes: 60,
      });
    }
  });

  it('shows the patient in the patient list and the derived values with their formulas', async () => {
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Patients' })
      .click();
    await page.getByRole('heading', { name: 'Patients' }).waitFor();
    await page.getByLabel('Name, MRN or case label').fill(familyName);
    await page.getByRole('link', { name: new RegExp(familyName, 'i') }).waitFor();
    await shot('patients');
    await page.getByRole('link', { name: new RegExp(familyName, 'i') }).click();
    await page.getByRole('heading', { name: 'Derived values' }).waitFor();
    await page.getByText('Creatinine clearance').waitFor();
    await page.getByText('Ideal body weight').waitFor();
    await page.getByText('Formula').first().click();
    await page.getByRole('note', { name: 'Result caution' }).first().waitFor();
    await page.getByRole('cell', { name: /72 kg/ }).first().waitFor();
    await shot('patient');
  });

  it('opens the course, refuses a level timed during an infusion, then adds a trough through the form', async () => {
    await page.getByRole('link', { name: /vancomycin · MRSA bacteraemia/i }).click();
    await page.getByRole('heading', { name: 'Timeline' }).waitFor();
    await page.getByRole('cell', { name: '1 g (1000 mg)' }).first().waitFor();

    const form = page.getByRole('form', { name: 'Add a level' });
    await form.getByLabel('Concentration').fill('14.2');
    // 30 min into the third infusion: the form refuses it unless "during the infusion" is chosen.
    await form
      .getByLabel('Collected at')
      .fill(localInput(new Date(firstDose.getTime() + 24.5 * hour)));
    await form.getByLabel('Sample').selectOption('trough');
    await form.getByRole('button', { name: 'Add level' }).click();
    await form.getByRole('alert').filter({ hasText: 'infusion' }).first().waitFor();
    await shot('level-refused');

    // A trough just before the third dose.
    await form
      .getByLabel('Collected at')
      .fill(localInput(new Date(firstDose.getTime() + 23.5 * hour)));
    await form.getByRole('button', { name: 'Add level' }).click();
    await page
      .getByRole('cell', { name: /14\.2 mg\/L/ })
      .first()
      .waitFor();
    await page
      .getByText(/Usable for|Not usable/)
      .first()
      .waitFor({ timeout: 15_000 });
    await shot('course');
  });

  it('fits the levels and shows estimates with intervals and the caution', async () => {
    await page
      .getByRole('navigation', { name: 'Course sections' })
      .getByRole('link', { name: 'Fit' })
      .click();
    await page
      .getByRole('heading', { name: 'Levels against the fitted and population curves' })
      .waitFor();
    await page.getByText(/Method: Bayesian/).waitFor({ timeout: 30_000 });
    await page.getByRole('cell', { name: /Clearance CL/ }).waitFor();
    await page.getByRole('note', { name: 'Result caution' }).first().waitFor();
    await shot('fit');
  });

  it('changes the dose in the regimen explorer and sees the AUC24 change, in the browser', async () => {
    await page
      .getByRole('navigation', { name: 'Course sections' })
      .getByRole('link', { name: 'Regimen explorer' })
      .click();
    await page.getByRole('heading', { name: 'Candidate regimens' }).waitFor();
    // CrCl about 70 mL/min: the suggestion leads the table and is an every-12 or every-24 h regimen,
    // the usual practice for vancomycin; a long interval further down says why it is unusual.
    const candidates = page.locator('table', {
      has: page.getByRole('columnheader', { name: 'AUC24' }),
    });
    const firstRow = candidates.locator('tbody tr').first();
    await firstRow.waitFor({ timeout: 30_000 });
    const first = (await firstRow.textContent()) ?? '';
    expect(first).toMatch(/suggested/);
    expect(first).toMatch(/every (12|24) h/);
    const auc = page.getByTestId('what-if-auc24');
    await auc.waitFor({ timeout: 30_000 });
    const before = await auc.textContent();
    const dose = page.getByLabel('Maintenance dose (mg)');
    const current = Number(await dose.inputValue());
    await dose.fill(String(current + 500));
    await expect.poll(async () => auc.textContent(), { timeout: 5_000 }).not.toBe(before);
    const echo = await page.getByTestId('what-if-echo').textContent();
    expect(echo).toMatch(/\(\d+ mg\) over .* every \d+ h/);
    await shot('regimens');
  });

  it('starts a draft plan from the chosen regimen', async () => {
    await page.getByRole('button', { name: 'Use this regimen' }).click();
    await page
      .getByRole('status')
      .filter({ hasText: /Draft plan/ })
      .waitFor({ timeout: 15_000 });
    await shot('draft-plan');
  });

  it('lists the course on the caseload', async () => {
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Caseload' })
      .click();
    await page.getByRole('heading', { name: 'Caseload' }).waitFor();
    await page.getByRole('link', { name: new RegExp(familyName, 'i') }).waitFor();
    await shot('caseload');
    expect(journey.consoleErrors).toEqual([]);
  });
});
