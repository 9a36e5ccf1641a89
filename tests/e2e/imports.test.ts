import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { api, createJourneyPatient } from '../support/api';
import { drugModelLibrary } from '../../packages/kinetics/src/index';
import { createDb } from '../../apps/api/src/data-access/db';
import { syncEngineLibrary } from '../../apps/api/src/domain/drug-models/drug-models';
import { openJourneyPage, screenshotDir } from '../support/browser';
import { DEMO_LOGINS, signInToCaseload } from '../support/sign-in';

let journey: Awaited<ReturnType<typeof openJourneyPage>>;
let page: Page;
const csvPanel = () => page.getByRole('region', { name: 'CSV upload' });
const shot = (name: string) =>
  page.screenshot({ path: path.join(screenshotDir, `imports-${name}.png`), fullPage: true });

// The test's own course: three 1 g infusions over 1 h, 12 h apart, the first 30 h ago.
const hour = 3_600_000;
const firstDose = new Date(Math.floor((Date.now() - 30 * hour) / (15 * 60_000)) * 15 * 60_000);
const at = (hoursFromFirstDose: number) =>
  new Date(firstDose.getTime() + hoursFromFirstDose * hour).toISOString();
let courseId = '';

/** Levels in the layout of tests/fixtures/csv/vancomycin-levels.csv, at this run's times. */
function levelsCsv(rows: Array<[string, string, string, string]>): Buffer {
  const lines = [
    'Collection time,Result,Unit,Sample kind,LLOQ',
    ...rows.map((r) => `${r.join(',')},2`),
  ];
  return Buffer.from(`${lines.join('\n')}\n`, 'utf8');
}
// A trough 30 min before the third dose and a peak 1 h after its infusion ended.
// Source: the values of tests/fixtures/csv/vancomycin-levels.csv (invented, plausible vancomycin levels).
const trough: [string, string, string, string] = [at(23.5), '13.8', 'mg/L', 'trough'];
const peak: [string, string, string, string] = [at(26), '29.5', 'mg/L', 'peak'];
// A "random" level timed 3 h from now: refused, a collection time cannot be in the future.
const future: [string, string, string, string] = [
  new Date(Date.now() + 3 * hour).toISOString(),
  '18.1',
  'mg/L',
  'random',
];

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
  journey = await openJourneyPage();
  page = journey.page;
});
afterAll(() => journey?.session.close());

describe('CSV import of levels (pharmacist)', () => {
  it('signs in and creates its own patient, course and doses through the API', async () => {
    await signInToCaseload(page, DEMO_LOGINS.pharmacist);
    const request = page.request;
    const patient = await createJourneyPatient(request, {
      givenName: 'Ines',
      familyName: 'Marrow',
      sex: 'female',
      birthDate: '1961-07-02',
    });
    // The covariates the model needs (invented), charted 2 h before the first dose.
    const observedAt = at(-2);
    for (const c of [
      { kind: 'weight', value: 68, unit: 'kg', weightSource: 'measured' },
      { kind: 'height', value: 162, unit: 'cm' },
      { kind: 'serum-creatinine', value: 80, unit: 'umol/L' },
    ]) {
      await api(request, 'post', `/api/patients/${patient.id}/covariates`, { ...c, observedAt });
    }
    const models = await api<{ items: { id: string }[] }>(
      request,
      'get',
      '/api/drug-models?drug=vancomycin',
    );
    const course = await api<{ id: string }>(
      request,
      'post',
      `/api/patients/${patient.id}/courses`,
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
        startAt: at(i * 12),
        infusionMinutes: 60,
      });
    }
  });

  it('previews a file with a level timed in the future: that row is refused with its reason and nothing can be saved', async () => {
    await page.goto(`${inject('baseUrl')}/courses/${courseId}`);
    await page
      .getByRole('navigation', { name: 'Course sections' })
      .getByRole('link', { name: 'Import', exact: true })
      .click();
    await csvPanel().getByLabel('Rows are').selectOption('levels');
    await csvPanel()
      .getByLabel('CSV file')
      .setInputFiles({
        name: 'levels-with-a-bad-row.csv',
        mimeType: 'text/csv',
        buffer: levelsCsv([trough, peak, future]),
      });
    await csvPanel().getByRole('button', { name: 'Preview', exact: true }).click();
    const refused = csvPanel().getByRole('row').filter({ hasText: 'refused' });
    await refused.waitFor();
    await expect(refused.count()).resolves.toBe(1);
    await expect(refused.textContent()).resolves.toMatch(/in the future/);
    await csvPanel()
      .getByRole('status')
      .filter({ hasText: '2 rows can be saved, 1 are refused' })
      .waitFor();
    // All or nothing: the save stays disabled while any row is refused...
    await expect(
      csvPanel()
        .getByRole('button', { name: /^Save all/ })
        .isDisabled(),
    ).resolves.toBe(true);
    await shot('1-refused-row');
  });

  it('and the server refuses a commit of that file outright, saving none of its rows', async () => {
    const res = await page.request.post(
      `${inject('baseUrl')}/api/courses/${courseId}/imports/csv`,
      {
        headers: { Origin: inject('baseUrl') },
        multipart: {
          kind: 'levels',
          mode: 'commit',
          file: {
            name: 'levels-with-a-bad-row.csv',
            mimeType: 'text/csv',
            buffer: levelsCsv([trough, peak, future]),
          },
        },
      },
    );
    expect(res.status()).toBe(400);
    expect(((await res.json()) as { code: string }).code).toBe('import-refused');
    const levels = await api<{ items: unknown[] }>(
      page.request,
      'get',
      `/api/courses/${courseId}/levels`,
    );
    expect(levels.items).toEqual([]);
  });

  it('uploads the clean file, saves every row, and the levels appear in the course', async () => {
    await csvPanel()
      .getByLabel('CSV file')
      .setInputFiles({
        name: 'levels.csv',
        mimeType: 'text/csv',
        buffer: levelsCsv([trough, peak]),
      });
    await csvPanel().getByRole('button', { name: 'Preview', exact: true }).click();
    await csvPanel()
      .getByRole('status')
      .filter({ hasText: '2 rows can be saved, 0 are refused' })
      .waitFor();
    await csvPanel().getByRole('button', { name: 'Save all 2 rows' }).click();
    await csvPanel().getByRole('status').filter({ hasText: 'Saved 2 rows.' }).waitFor();
    await shot('2-saved');
    await page
      .getByRole('navigation', { name: 'Course sections' })
      .getByRole('link', { name: 'Doses and levels' })
      .click();
    await page
      .getByRole('cell', { name: /13\.8 mg\/L/ })
      .first()
      .waitFor();
    await page
      .getByRole('cell', { name: /29\.5 mg\/L/ })
      .first()
      .waitFor();
    await shot('3-course-levels');
    expect(journey.consoleErrors).toEqual([]);
  });
});
