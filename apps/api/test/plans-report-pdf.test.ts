import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedInAgent, type SignedInClient } from './support/sign-in';
import { realCourse, regimenBody, startPlanWorld, type PlanWorld } from './plans-fixtures';

// Rendered PDFs and PNGs go to the git-ignored test-output/ for a look by eye.
const outDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../test-output');

let world: PlanWorld;
let pharmacist: SignedInClient;

beforeAll(async () => {
  world = await startPlanWorld();
  pharmacist = await signedInAgent(world.app, 'pharmacist');
});
afterAll(() => world?.stop());

async function downloadPdf(planId: string, name: string): Promise<string> {
  const res = await pharmacist
    .get(`/api/plans/${planId}/report.pdf`)
    .buffer(true)
    .parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
  expect(res.status).toBe(200);
  mkdirSync(outDir, { recursive: true });
  const file = path.join(outDir, `${name}.pdf`);
  writeFileSync(file, res.body as Buffer);
  return file;
}

const textOf = (file: string) =>
  execFileSync('pdftotext', ['-layout', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' }).replace(
    /\s+/g,
    ' ',
  );

/** Whole years between a birth date and a date (the patient screen's age). */
function ageOn(birthDate: string, on: Date): number {
  const b = new Date(`${birthDate}T00:00:00Z`);
  let age = on.getUTCFullYear() - b.getUTCFullYear();
  const m = on.getUTCMonth() - b.getUTCMonth();
  if (m < 0 || (m === 0 && on.getUTCDate() < b.getUTCDate())) age -= 1;
  return age;
}

describe('GET /api/plans/:id/report.pdf', () => {
  it('when a plan rests on a Bayesian fit, then the PDF shows the derived values with their formulas, and the plot has the population curve and band', async () => {
    // Arrange: the invented patient of realCourse: male, born 1961-05-20, measured weight 82 kg,
    // height 178 cm, serum creatinine 90 µmol/L; two vancomycin levels.
    const { courseId } = await realCourse(pharmacist);
    const created = await pharmacist.post(`/api/courses/${courseId}/plans`).send(regimenBody());
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const age = ageOn('1961-05-20', new Date());
    const scrMgDl = 90 / 88.4; // Source: common practice (creatinine 88.4 µmol/L per mg/dL)
    // Source: Devine BJ. Drug Intell Clin Pharm 1974;8:650-5 (male: 50 kg + 2.3 kg per inch over 60 in).
    const ibw = 50 + 2.3 * (178 / 2.54 - 60);
    // 82 kg is under 1.2 × IBW, so Cockcroft-Gault takes total body weight (common practice).
    // Source: Cockcroft DW, Gault MH. Nephron 1976;16:31-41.
    const crcl = ((140 - age) * 82) / (72 * scrMgDl);
    // Source: Mosteller RD. N Engl J Med 1987;317:1098.
    const bsa = Math.sqrt((178 * 82) / 3600);
    // Act
    const file = await downloadPdf(created.body.id, 'plan-from-api');
    const text = textOf(file);
    // Assert: every derived value, with the weight used and the formula.
    expect(text).toContain('Derived values');
    expect(text).toContain('Creatinine clearance');
    expect(text).toContain(`${crcl.toFixed(1)} mL/min`);
    expect(text).toMatch(/Cockcroft-Gault: CrCl = \(140 − \d+ y\)/);
    expect(text).toContain('total body weight 82 kg used');
    expect(text).toContain('Ideal body weight');
    expect(text).toContain(`${ibw.toFixed(2)} kg`);
    expect(text).toContain('IBW: Devine: 50 kg + 2.3 kg per inch over 60 in');
    expect(text).toContain('Adjusted body weight');
    expect(text).toContain('AdjBW = IBW + 0.4 × (TBW − IBW)');
    expect(text).toContain('Lean body weight');
    expect(text).toContain('LBW: Janmahasatian');
    expect(text).toContain('Body surface area');
    expect(text).toContain(`${bsa.toFixed(2)} m²`);
    expect(text).toContain('BSA: Mosteller');
    expect(text).toContain('eGFR');
    expect(text).toContain('CKD-EPI 2021');
    expect(text).toMatch(/does not replace,\s+clinical judgement/);
    expect(text).toContain('Population');
    expect(text).toContain('Approx. 90% band');
    expect(text).not.toContain('no interval computed');
    // The fit table shows the intervals too; the CrCl is a derived value, not a warning.
    expect(text).not.toMatch(/Warning: CrCl =/);
    expect(text).toContain("the model's CRCL covariate");
    // The stored basis carries the fit's intervals the band is drawn from.
    const row = await world.db('plans').where({ id: created.body.id }).first();
    expect(row.content.basis.uncertainty.CL.low).toBeLessThan(row.content.basis.parameters.CL);
    expect(row.content.basis.uncertainty.CL.high).toBeGreaterThan(row.content.basis.parameters.CL);
    // Pages 1 to 3 (the plot) as PNG, for a look by eye.
    execFileSync('pdftoppm', [
      '-png',
      '-r',
      '60',
      '-f',
      '1',
      '-l',
      '3',
      file,
      path.join(outDir, 'plan-from-api'),
    ]);
  });
});
