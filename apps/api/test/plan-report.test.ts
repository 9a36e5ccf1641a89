import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { formatDateTime, formatDoseMg, formatNumber } from '../src/reports/format';
import type { PlanReportModel } from '../src/reports/plan-report-model';
import {
  CLINICAL_JUDGEMENT_STATEMENT,
  renderPlanReport,
  safeGlyphs,
} from '../src/reports/render-plan-report';
import { planReportModelFixture } from './fixtures/plan-report-model';

// Rendered PDFs and PNGs go to the git-ignored test-output/ for a look by eye.
const outDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../test-output');
const FIXED = new Date('2026-12-03T04:05:00Z');

async function render(name: string, model: PlanReportModel) {
  mkdirSync(outDir, { recursive: true });
  const pdf = await renderPlanReport(model, { creationDate: FIXED });
  const file = path.join(outDir, `${name}.pdf`);
  writeFileSync(file, pdf);
  return { pdf, file };
}

/** pdftotext -layout (poppler-utils) of the whole file or one page, whitespace collapsed. */
function textOf(file: string, page?: number): string {
  const args = page ? ['-f', String(page), '-l', String(page)] : [];
  return execFileSync('pdftotext', ['-layout', ...args, '-enc', 'UTF-8', file, '-'], {
    encoding: 'utf8',
  })
    .replace(/\s+/g, ' ')
    .trim();
}

function pageCount(file: string): number {
  const info = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
  return Number(/Pages:\s+(\d+)/.exec(info)?.[1]);
}

// A4 in points; the body lies between the header rule (y 56) and the footer rule (y 782).
const PAGE_H = 841.89;
const BODY_TOP = 60;
const FOOTER_TOP = 778;

const SECTION_HEADINGS = [
  'Patient and course',
  'Recommendation',
  'Warnings and cautions',
  'Covariates',
  'Derived values',
  'Doses',
  'Levels',
  'Fit',
  'Regimens compared',
  'Administration times',
  'Next levels',
  'Rationale',
  'Signatures',
];

/** The non-empty lines of one page's body (header and footer cut away), trimmed. */
function bodyLines(file: string, page: number): string[] {
  const crop = [
    '-x',
    '0',
    '-y',
    String(BODY_TOP),
    '-W',
    '600',
    '-H',
    String(FOOTER_TOP - BODY_TOP),
  ];
  const args = ['-layout', '-f', String(page), '-l', String(page), ...crop, '-enc', 'UTF-8'];
  return execFileSync('pdftotext', [...args, file, '-'], { encoding: 'utf8' })
    .split('\n')
    .map((l) => l.replace(/\s+/g, ' ').trim())
    .filter(Boolean);
}

interface WordBox {
  text: string;
  xMin: number;
  yMin: number;
  xMax: number;
  yMax: number;
}

/** Every word of one page with its box in points (pdftotext -bbox). */
function wordBoxes(file: string, page: number): WordBox[] {
  const html = execFileSync(
    'pdftotext',
    ['-bbox', '-f', String(page), '-l', String(page), '-enc', 'UTF-8', file, '-'],
    { encoding: 'utf8' },
  );
  const re =
    /<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)<\/word>/g;
  return [...html.matchAll(re)].map((m) => ({
    xMin: Number(m[1]),
    yMin: Number(m[2]),
    xMax: Number(m[3]),
    yMax: Number(m[4]),
    text: m[5]!,
  }));
}

const overlaps = (a: WordBox, b: WordBox) =>
  a.xMin < b.xMax - 0.5 && b.xMin < a.xMax - 0.5 && a.yMin < b.yMax - 0.5 && b.yMin < a.yMax - 0.5;

/** Asserts no page's body ends with a section heading: a heading always has content under it. */
function expectNoOrphanHeadings(file: string): void {
  for (let p = 1; p <= pageCount(file); p++) {
    const lines = bodyLines(file, p);
    expect(SECTION_HEADINGS, `page ${p} ends with a heading`).not.toContain(lines.at(-1));
  }
}

describe('renderPlanReport(model)', () => {
  let file: string;
  let text: string;

  beforeAll(async () => {
    ({ file } = await render('plan-report', planReportModelFixture()));
    text = textOf(file);
  });

  it('when rendered, then page 1 carries the boxed clinical-judgement statement', () => {
    const page1 = textOf(file, 1);
    expect(page1).toContain(CLINICAL_JUDGEMENT_STATEMENT);
    expect(page1).toContain('supports, and does not replace, clinical judgement');
    expect(page1).toContain('Local protocols and licensed practice take precedence');
  });

  it('when rendered, then the signatures show printed name, role, meaning, time with zone and hash', () => {
    expect(text).toContain('Priya Halvorsen, Clinical pharmacist');
    expect(text).toContain('Tomasz Adeyemi-Clarke, Reviewing pharmacist');
    expect(text).toMatch(/Meaning authored/);
    expect(text).toMatch(/Meaning reviewed – agree/);
    expect(text).toContain('3 Dec 2026 11:42 UTC+10');
    expect(text).toContain('3 Dec 2026 13:17 UTC+10');
    expect(text).toContain('9f2c4e1ab7d05538c6e2f0a41b9d7e6c3a5f8b20d4e61c97a0b3f5d82e7c1a64');
  });

  it('when rendered, then the regimen table and recommendation print the given numbers in ISMP form', () => {
    expect(text).toContain(
      'Vancomycin 1 g (1,000 mg) intravenously every 12 h, each dose infused over 1 h',
    );
    expect(text).toContain('Predicted: AUC24 462 mg·h/L, peak 27.9 mg/L, trough 12.1 mg/L');
    expect(text).toContain('1.25 g (1,250 mg) 12 h 1.5 h – 34.6 15.2 578 met');
    // pdftotext sometimes drops the space in a short right-aligned cell ("8h"); the PDF has it
    expect(text).toMatch(/750 mg 8 ?h 1 ?h – 24\.3 15\.8 551 met/);
    expect(text).toContain('met – CHOSEN');
    expect(text).toMatch(/500 mg 12 h 1 ?h – 14 6\.1 231 not met/);
    // no trailing zeros and no naked decimals before a unit
    expect(text).not.toMatch(/\d\.\d*0 ?(mg|g|h|L|mg\/L|L\/h)\b/);
    expect(text).not.toMatch(/(^|[\s(])\.\d/);
  });

  it('when rendered, then sampling times are tied to a named dose and clock times are shown', () => {
    expect(text).toContain('Draw 1 h after the END of the 08:00 dose on 4 Dec.');
    expect(text).toContain('Draw 30 min before the START of the 08:00 dose on 5 Dec.');
    expect(text).toContain('3 Dec 2026 20:00 1 g (1,000 mg) 1 h first dose of the new regimen');
  });

  it('when rendered, then patient, covariates with units, derived formulas, levels, fit and warnings appear', () => {
    expect(text).toContain('MERIWETHER, Isla Jane');
    expect(text).toContain('KB-0042917');
    expect(text).toContain('4 North');
    expect(text).toContain('96 µmol/L 1.09 mg/dL 2 Dec 2026 06:10 laboratory');
    expect(text).toContain('Cockcroft-Gault: (140 − age) × weight × 0.85 ÷ (0.815 × SCr µmol/L)');
    expect(text).toContain('Mosteller: sqrt(height cm × weight kg ÷ 3600)'); // √ is not in Noto Sans
    expect(text).toContain('41.5 mg/L discard?');
    expect(text).toContain('Clearance (CL) 3.6 L/h 3.05 to 4.21 L/h 4.4 L/h');
    expect(text).toContain('Shrinkage: CL 18%, V 41%');
    expect(text).toContain('Time since first dose (h)');
    expect(text).toContain('90% prediction interval');
    expect(text).toContain('Warning: Serum creatinine rose');
  });

  it('when rendered, then every page has "Page N of M", the plan id and version and the generated time', () => {
    const pages = pageCount(file);
    expect(pages).toBeGreaterThanOrEqual(3);
    for (let p = 1; p <= pages; p++) {
      const page = textOf(file, p);
      expect(page).toContain(`Page ${p} of ${pages}`);
      expect(page).toContain('Plan PLN-7Q4K2 v2');
      expect(page).toContain('Generated 3 Dec 2026 14:05 UTC+10');
      expect(page).toContain('Kestrel Bay Regional Hospital');
    }
  });

  it('when rendered, then no page ends with a section heading and the fit plot shares a page with its heading', () => {
    expectNoOrphanHeadings(file);
    const pages = pageCount(file);
    const fitPage = [...Array(pages).keys()]
      .map((i) => i + 1)
      .find((p) => bodyLines(file, p).includes('Fit'));
    expect(fitPage).toBeDefined();
    const fitBody = bodyLines(file, fitPage!).join(' ');
    expect(fitBody).toContain('Method: Bayesian MAP estimate');
    expect(fitBody).toContain('Time since first dose (h)');
  });

  it('when rendered, then Noto Sans is embedded (pdffonts)', () => {
    const fonts = execFileSync('pdffonts', [file], { encoding: 'utf8' });
    const noto = fonts.split('\n').filter((l) => /NotoSans-(Regular|Bold)/.test(l));
    expect(noto).toHaveLength(2);
    for (const line of noto) expect(line).toMatch(/CID TrueType\s+Identity-H\s+yes\s+yes\s+yes/);
  });

  it('when page 1 is rendered to PNG, then the image is written for inspection', () => {
    const prefix = path.join(outDir, 'plan-report-page');
    execFileSync('pdftoppm', [
      '-png',
      '-r',
      '60',
      '-f',
      '1',
      '-l',
      '1',
      '-singlefile',
      file,
      prefix,
    ]);
    expect(existsSync(`${prefix}.png`)).toBe(true);
  });

  it('when rendered twice with a fixed creation date, then the bytes are identical', async () => {
    const a = await renderPlanReport(planReportModelFixture(), { creationDate: FIXED });
    const b = await renderPlanReport(planReportModelFixture(), { creationDate: FIXED });
    expect(a.subarray(0, 5).toString()).toBe('%PDF-');
    expect(a.equals(b)).toBe(true);
  });
});

describe('renderPlanReport(model) with a long dose list', () => {
  it('when the doses fill several pages, then the table breaks with its header repeated and pages numbered', async () => {
    // Arrange
    const model = planReportModelFixture({ extraDoses: 120 });

    // Act
    const { file } = await render('plan-report-long', model);

    // Assert
    const pages = pageCount(file);
    expect(pages).toBeGreaterThanOrEqual(6);
    const withDoseRows = [];
    for (let p = 1; p <= pages; p++) {
      const page = textOf(file, p);
      expect(page).toContain(`Page ${p} of ${pages}`);
      if (/IV infusion 1 h planned/.test(page)) withDoseRows.push(page);
    }
    expect(withDoseRows.length).toBeGreaterThanOrEqual(3);
    for (const page of withDoseRows)
      expect(page).toMatch(/# Start Amount Route Duration Status Note/);
    expect(textOf(file)).toContain('125 ');
  });
});

describe('renderPlanReport(model) page breaks and footer', () => {
  it('when sections land at different places on the page, then no heading is left at the foot of a page', async () => {
    for (const extraDoses of [3, 9, 15, 21]) {
      const { file } = await render('plan-report-breaks', planReportModelFixture({ extraDoses }));
      expectNoOrphanHeadings(file);
    }
  });

  it.each([
    [
      'a UUID',
      '3f9c2a7e-81b4-4d2f-9e6a-0c5b7d1e4a92',
      'Plan 3f9c2a7e-81b4-4d2f-9e6a-0c5b7d1e4a92 v2',
    ],
    ['a very long id', `PLAN-${'X7'.repeat(150)}`, 'Plan PLAN-X7X…'],
  ])(
    'when the plan id is %s, then the footer parts never overlap and all appear on every page',
    async (_label, id, planText) => {
      const model = planReportModelFixture({ status: 'draft', extraDoses: 30 });
      model.plan.id = id;
      const { file } = await render('plan-report-long-id', model);
      const pages = pageCount(file);
      expect(pages).toBeGreaterThanOrEqual(2);
      for (let p = 1; p <= pages; p++) {
        const footer = wordBoxes(file, p).filter((b) => b.yMin >= FOOTER_TOP);
        const footerText = footer.map((b) => b.text).join(' ');
        expect(footerText).toContain(`Page ${p} of ${pages}`);
        expect(footerText).toContain(planText);
        expect(footerText).toContain('Draft – not submitted');
        expect(footerText).toContain('Generated 3 Dec 2026 14:05 UTC+10 by Priya Halvorsen');
        for (const b of footer) expect(b.yMax).toBeLessThan(PAGE_H);
        for (let i = 0; i < footer.length; i++)
          for (let j = i + 1; j < footer.length; j++)
            expect(
              overlaps(footer[i]!, footer[j]!),
              `page ${p}: "${footer[i]!.text}" overlaps "${footer[j]!.text}"`,
            ).toBe(false);
      }
    },
  );
});

describe('renderPlanReport(model) states and teaching cases', () => {
  it('when the plan is only submitted, then it says prominently that it is not countersigned', async () => {
    const model = planReportModelFixture({ status: 'submitted' });
    model.signatures = model.signatures.filter((s) => s.meaning === 'authored');
    const { file } = await render('plan-report-submitted', model);
    const page1 = textOf(file, 1);
    expect(page1).toContain('NOT COUNTERSIGNED');
    expect(page1).toContain('Submitted – awaiting countersignature');
    expect(textOf(file)).toContain('Not countersigned by a reviewing pharmacist.');
  });

  it('when the patient is a teaching case, then no name, MRN or birth date prints and times are relative', async () => {
    const base = planReportModelFixture();
    const model: PlanReportModel = {
      ...base,
      timeBase: { kind: 'relative', origin: '2026-11-30T14:00:00.000Z' }, // day 1 00:00 (UTC+10)
      patient: { ...base.patient, kind: 'teaching-case', mrn: null, dateOfBirth: null },
    };
    const { file } = await render('plan-report-teaching', model);
    const text = textOf(file);
    expect(text).toContain('Teaching case');
    expect(text).not.toContain('MERIWETHER');
    expect(text).not.toContain('KB-0042917');
    expect(text).not.toContain('1959');
    expect(text).toContain('Day 1 08:00');
  });
});

describe('report formatting', () => {
  it('formatDoseMg(mg) echoes grams in milligrams and never prints trailing zeros', () => {
    expect(formatDoseMg(1000)).toBe('1 g (1,000 mg)');
    expect(formatDoseMg(1250)).toBe('1.25 g (1,250 mg)');
    expect(formatDoseMg(750)).toBe('750 mg');
    expect(formatDoseMg(0.5)).toBe('0.5 mg');
  });

  it('formatNumber(x) has a leading zero, no trailing zeros and thousands separators', () => {
    expect(formatNumber(0.25)).toBe('0.25');
    expect(formatNumber(5.0)).toBe('5');
    expect(formatNumber(12.5, 1)).toBe('12.5');
    expect(formatNumber(2500)).toBe('2,500');
    expect(formatNumber(-1.5)).toBe('−1.5');
  });

  it('formatDateTime(iso, base) prints clock time in the zone or relative days', () => {
    expect(
      formatDateTime(
        '2026-12-03T22:00:00Z',
        { kind: 'clock', timeZone: 'Australia/Brisbane' },
        true,
      ),
    ).toBe('4 Dec 2026 08:00 UTC+10');
    expect(
      formatDateTime('2026-12-02T08:00:00Z', { kind: 'relative', origin: '2026-12-01T00:00:00Z' }),
    ).toBe('Day 2 08:00');
  });

  it('safeGlyphs(text) writes words for symbols Noto Sans lacks', () => {
    expect(safeGlyphs('AUC24 ≥ 400')).toBe('AUC24 at least 400');
    expect(safeGlyphs('trough≤15 mg/L')).toBe('trough at most 15 mg/L');
    expect(safeGlyphs('√(h×w)')).toBe('sqrt(h×w)');
    expect(safeGlyphs('µ ± ·', () => true)).toBe('µ ± ·');
    expect(safeGlyphs('a\u2713b', () => false)).toBe('ayesb');
    expect(safeGlyphs('x\u2605', (cp) => cp !== 0x2605)).toBe('x[U+2605]');
  });
});
