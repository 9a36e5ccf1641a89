import path from 'node:path';
import { fileURLToPath } from 'node:url';
import PDFDocument from 'pdfkit';
import {
  describeTimeBase,
  formatClock,
  formatConc,
  formatDateTime,
  formatDay,
  formatDoseMg,
  formatHours,
  formatNumber,
} from './format';
import type { PlanReportModel, PlanReportPlot } from './plan-report-model';

/**
 * The statement printed, boxed, on the first page of every plan report. Our own wording.
 */
export const CLINICAL_JUDGEMENT_STATEMENT =
  'This report supports, and does not replace, clinical judgement. It was generated from the ' +
  'data stored for this plan; check it against the patient, the current results and the ' +
  'administration record before acting on it. Local protocols and licensed practice take ' +
  'precedence over anything in this report.';

const FONT_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../assets/fonts');
const FONTS = {
  regular: path.join(FONT_DIR, 'NotoSans-Regular.ttf'),
  bold: path.join(FONT_DIR, 'NotoSans-Bold.ttf'),
  italic: path.join(FONT_DIR, 'NotoSans-Italic.ttf'),
} as const;

// Our own palette: ink, slate, a deep teal accent and a warm caution colour.
const INK = '#1b2530';
const MUTED = '#5b6675';
const RULE = '#c9d0d8';
const ACCENT = '#0f5e66';
const FILL = '#eef3f4';
const CAUTION = '#8a3b12';

const MARGIN = 48;
const HEADER_H = 26;
const FOOTER_H = 30;
/** Vertical space the concentration–time plot takes, legend included. */
const PLOT_SPACE = 260;
/** A plan id longer than this is shortened in the footer when the footer would not fit. */
const SHORT_ID_LENGTH = 8;

/**
 * Noto Sans has no glyph for these; they are written as words (ISMP also prefers words to the
 * symbols). Anything else the font lacks prints as its code point, e.g. "[U+2713]", never as a
 * blank box.
 */
const WORDS_FOR_MISSING_GLYPHS: Array<[RegExp, string]> = [
  [/\s*≥\s*/g, ' at least '],
  [/\s*≤\s*/g, ' at most '],
  [/\s*≈\s*/g, ' about '],
  [/\s*≠\s*/g, ' not equal to '],
  [/\s*→\s*/g, ' to '],
  [/√/g, 'sqrt'],
  [/∞/g, 'infinity'],
  [/✓/g, 'yes'],
  [/✗/g, 'no'],
];

/** Replaces characters the embedded font cannot draw (see WORDS_FOR_MISSING_GLYPHS). */
export function safeGlyphs(
  text: string,
  hasGlyph: (codePoint: number) => boolean = () => true,
): string {
  let out = text;
  if (/[≥≤≈≠→√∞✓✗]/.test(out)) {
    for (const [pattern, word] of WORDS_FOR_MISSING_GLYPHS) out = out.replace(pattern, word);
    out = out.replace(/^ +| +$/gm, '').replace(/ {2,}/g, ' ');
  }
  return [...out]
    .map((ch) => {
      const cp = ch.codePointAt(0)!;
      if (cp < 0x80 || ch === '\n' || hasGlyph(cp)) return ch;
      return `[U+${cp.toString(16).toUpperCase().padStart(4, '0')}]`;
    })
    .join('');
}

/** Routes every string pdfkit lays out or measures through safeGlyphs, with the current font. */
function guardGlyphs(doc: Doc): void {
  const current = () =>
    (doc as unknown as { _font?: { font?: { hasGlyphForCodePoint?: (cp: number) => boolean } } })
      ._font?.font;
  const check = (cp: number) => current()?.hasGlyphForCodePoint?.(cp) ?? true;
  const wrap = <K extends 'text' | 'heightOfString' | 'widthOfString'>(name: K) => {
    const original = (doc[name] as (...args: unknown[]) => unknown).bind(doc);
    (doc as unknown as Record<K, (...args: unknown[]) => unknown>)[name] = (
      first: unknown,
      ...rest: unknown[]
    ) => original(typeof first === 'string' ? safeGlyphs(first, check) : first, ...rest);
  };
  wrap('text');
  wrap('heightOfString');
  wrap('widthOfString');
}

export interface RenderOptions {
  /** Fixes CreationDate (and so the document ID) for byte-identical output in tests. */
  creationDate?: Date;
}

type Doc = PDFKit.PDFDocument;

interface Column {
  header: string;
  width: number; // fraction of the content width
  align?: 'left' | 'right' | 'center';
}

const STATUS_LABEL: Record<PlanReportModel['plan']['status'], string> = {
  draft: 'Draft – not submitted',
  submitted: 'Submitted – awaiting countersignature',
  countersigned: 'Countersigned',
  returned: 'Returned to the author',
  superseded: 'Superseded by a later plan',
};

/**
 * Renders the plan report as an A4 PDF with Noto Sans embedded (TTF from the repository).
 * Layout only: every value comes from `model`; nothing is computed here.
 */
export async function renderPlanReport(
  model: PlanReportModel,
  options: RenderOptions = {},
): Promise<Buffer> {
  const creationDate = options.creationDate ?? new Date(model.generatedAt);
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN + HEADER_H, bottom: MARGIN + FOOTER_H, left: MARGIN, right: MARGIN },
    bufferPages: true,
    autoFirstPage: true,
    info: {
      Title: `Dosing plan report – ${model.course.drug} – plan ${model.plan.id} v${model.plan.version}`,
      Author: model.hospitalName,
      Subject: 'Dosing plan report',
      Creator: 'Ebbtide',
      Producer: 'Ebbtide',
      CreationDate: creationDate,
      ModDate: creationDate,
    },
    lang: 'en-GB',
    displayTitle: true,
  });
  doc.registerFont('regular', FONTS.regular);
  doc.registerFont('bold', FONTS.bold);
  doc.registerFont('italic', FONTS.italic);
  doc.font('regular').fontSize(9).fillColor(INK);
  guardGlyphs(doc);

  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  new ReportWriter(doc, model).write();
  doc.end();
  return done;
}

class ReportWriter {
  private readonly left: number;
  private readonly width: number;

  constructor(
    private readonly doc: Doc,
    private readonly m: PlanReportModel,
  ) {
    this.left = doc.page.margins.left;
    this.width = doc.page.width - doc.page.margins.left - doc.page.margins.right;
  }

  private get bottom(): number {
    return this.doc.page.height - this.doc.page.margins.bottom;
  }

  private t(iso: string, withZone = false): string {
    return formatDateTime(iso, this.m.timeBase, withZone);
  }

  write(): void {
    this.titleBlock();
    this.statementBox();
    this.patientAndCourse();
    this.recommendation();
    this.warnings();
    this.covariates();
    this.derived();
    this.doses();
    this.levels();
    this.fit();
    this.regimens();
    this.administration();
    this.sampling();
    this.rationale();
    this.signatures();
    this.pageFurniture();
  }

  // ---- building blocks -------------------------------------------------------------------

  private ensureSpace(height: number): void {
    if (this.doc.y + height > this.bottom) this.doc.addPage();
  }

  /** Height of the body area of a page, between header and footer. */
  private get pageBodyHeight(): number {
    const { page } = this.doc;
    return page.height - page.margins.top - page.margins.bottom;
  }

  /** Height `heading(text)` takes, from the current y to where its first block starts. */
  private headingHeight(text: string): number {
    const { doc } = this;
    doc.font('regular').fontSize(9);
    const gap = doc.currentLineHeight(true) * 0.6;
    doc.font('bold').fontSize(11.5);
    const h = doc.heightOfString(text, { width: this.width });
    doc.font('regular').fontSize(9);
    return gap + h + 6;
  }

  /**
   * A section heading, kept with the first block under it: `firstBlock` is that block's height,
   * and when heading and block do not both fit, the heading starts a new page.
   */
  private heading(text: string, firstBlock: number): void {
    const { doc } = this;
    this.ensureSpace(this.headingHeight(text) + firstBlock);
    doc.font('regular').fontSize(9);
    doc.moveDown(0.6);
    doc
      .font('bold')
      .fontSize(11.5)
      .fillColor(ACCENT)
      .text(text, this.left, doc.y, { width: this.width });
    const y = doc.y + 1;
    doc
      .moveTo(this.left, y)
      .lineTo(this.left + this.width, y)
      .lineWidth(0.6)
      .strokeColor(RULE)
      .stroke();
    doc.y = y + 5;
    doc.font('regular').fontSize(9).fillColor(INK);
  }

  private paragraph(
    text: string,
    opts: { font?: string; size?: number; color?: string } = {},
  ): void {
    const { doc } = this;
    doc
      .font(opts.font ?? 'regular')
      .fontSize(opts.size ?? 9)
      .fillColor(opts.color ?? INK);
    const h = doc.heightOfString(text, { width: this.width });
    this.ensureSpace(Math.min(h, 40));
    doc.text(text, this.left, doc.y, { width: this.width });
    doc.font('regular').fontSize(9).fillColor(INK);
  }

  private paragraphHeight(text: string, opts: { font?: string; size?: number } = {}): number {
    const { doc } = this;
    doc.font(opts.font ?? 'regular').fontSize(opts.size ?? 9);
    const h = doc.heightOfString(text, { width: this.width });
    doc.font('regular').fontSize(9);
    return h;
  }

  /** What must stay on the page with a paragraph's heading: the paragraph, or its start. */
  private paragraphLead(text: string, opts: { font?: string; size?: number } = {}): number {
    return Math.min(this.paragraphHeight(text, opts), 40);
  }

  private none(text: string): void {
    this.paragraph(text, { font: 'italic', color: MUTED });
  }

  /** A heading followed by the italic "nothing here" line. */
  private emptySection(heading: string, text: string): void {
    this.heading(heading, this.paragraphLead(text, { font: 'italic' }));
    this.none(text);
  }

  /** The line height `doc.moveDown(lines)` moves by, in the regular body font. */
  private lines(n: number): number {
    this.doc.font('regular').fontSize(9);
    return this.doc.currentLineHeight(true) * n;
  }

  private factsRowHeight(row: Array<[string, string]>): number {
    const { doc } = this;
    const colW = this.width / 2;
    const labelW = 92;
    doc.fontSize(9);
    return Math.max(
      ...row.map(([, v]) => doc.font('regular').heightOfString(v, { width: colW - labelW - 8 })),
    );
  }

  /** Key/value pairs in two columns. */
  private facts(pairs: Array<[string, string]>): void {
    const { doc } = this;
    const colW = this.width / 2;
    const labelW = 92;
    for (let i = 0; i < pairs.length; i += 2) {
      const row = pairs.slice(i, i + 2);
      const h = this.factsRowHeight(row);
      this.ensureSpace(h + 3);
      const y = doc.y;
      row.forEach(([k, v], j) => {
        const x = this.left + j * colW;
        doc
          .font('bold')
          .fillColor(MUTED)
          .text(k, x, y, { width: labelW - 4 });
        doc
          .font('regular')
          .fillColor(INK)
          .text(v, x + labelW, y, { width: colW - labelW - 8 });
      });
      doc.y = y + h + 3;
    }
    doc.x = this.left;
  }

  private static readonly TABLE_PAD = 3;
  private static readonly TABLE_SIZE = 8.5;

  private tableHeaderHeight(columns: Column[]): number {
    const { doc } = this;
    const pad = ReportWriter.TABLE_PAD;
    doc.font('bold').fontSize(ReportWriter.TABLE_SIZE);
    const h =
      Math.max(
        ...columns.map((c) =>
          doc.heightOfString(c.header, { width: c.width * this.width - 2 * pad }),
        ),
      ) +
      2 * pad;
    doc.font('regular').fontSize(9);
    return h;
  }

  /**
   * Height of a table's header row and its first `count` rows (all rows when omitted): what a
   * heading must keep with it is the header row and the first row.
   */
  private tableHeight(
    columns: Column[],
    rows: string[][],
    opts: { highlight?: (i: number) => boolean } = {},
    count = rows.length,
  ): number {
    const widths = columns.map((c) => c.width * this.width);
    let h = this.tableHeaderHeight(columns);
    rows.slice(0, count).forEach((row, r) => {
      h += this.rowHeight(
        row,
        widths,
        ReportWriter.TABLE_PAD,
        ReportWriter.TABLE_SIZE,
        opts.highlight?.(r) ?? false,
      );
    });
    this.doc.font('regular').fontSize(9);
    return h;
  }

  /** A table under its own heading, kept with the header row and first row. */
  private tableSection(
    heading: string,
    columns: Column[],
    rows: string[][],
    opts: { highlight?: (i: number) => boolean } = {},
  ): void {
    this.heading(heading, this.tableHeight(columns, rows, opts, 1));
    this.table(columns, rows, opts);
  }

  /** A table that breaks across pages and repeats its header row on each new page. */
  private table(
    columns: Column[],
    rows: string[][],
    opts: { highlight?: (i: number) => boolean } = {},
  ): void {
    const { doc } = this;
    const pad = ReportWriter.TABLE_PAD;
    const widths = columns.map((c) => c.width * this.width);
    const size = ReportWriter.TABLE_SIZE;
    const headerH = this.tableHeaderHeight(columns);
    const drawHeader = () => {
      doc.font('bold').fontSize(size);
      const h = headerH;
      const y = doc.y;
      doc.rect(this.left, y, this.width, h).fill(FILL);
      let x = this.left;
      columns.forEach((c, i) => {
        doc.fillColor(ACCENT).text(c.header, x + pad, y + pad, {
          width: widths[i]! - 2 * pad,
          align: c.align ?? 'left',
        });
        x += widths[i]!;
      });
      doc.y = y + h;
      doc.font('regular').fillColor(INK);
    };
    this.ensureSpace(this.tableHeight(columns, rows, opts, 1));
    drawHeader();
    rows.forEach((row, r) => {
      const highlighted = opts.highlight?.(r) ?? false;
      const h = this.rowHeight(row, widths, pad, size, highlighted);
      if (doc.y + h > this.bottom) {
        doc.addPage();
        drawHeader();
      }
      const y = doc.y;
      if (highlighted) doc.rect(this.left, y, this.width, h).fill('#fff4dc');
      let x = this.left;
      row.forEach((cell, i) => {
        doc
          .font(highlighted ? 'bold' : 'regular')
          .fontSize(size)
          .fillColor(INK)
          .text(cell, x + pad, y + pad, {
            width: widths[i]! - 2 * pad,
            align: columns[i]?.align ?? 'left',
          });
        x += widths[i]!;
      });
      doc
        .moveTo(this.left, y + h)
        .lineTo(this.left + this.width, y + h)
        .lineWidth(0.4)
        .strokeColor(RULE)
        .stroke();
      doc.y = y + h;
    });
    doc.x = this.left;
    doc.font('regular').fontSize(9).fillColor(INK);
  }

  private rowHeight(
    row: string[],
    widths: number[],
    pad: number,
    size: number,
    bold: boolean,
  ): number {
    const { doc } = this;
    doc.font(bold ? 'bold' : 'regular').fontSize(size);
    return (
      Math.max(
        ...row.map((cell, i) => doc.heightOfString(cell || ' ', { width: widths[i]! - 2 * pad })),
      ) +
      2 * pad
    );
  }

  // ---- sections ------------------------------------------------------------------------

  private patientName(): string {
    const p = this.m.patient;
    return p.kind === 'teaching-case' ? 'Teaching case' : (p.displayName ?? 'Name not recorded');
  }

  private titleBlock(): void {
    const { doc, m } = this;
    doc
      .font('bold')
      .fontSize(17)
      .fillColor(INK)
      .text(`Dosing plan report: ${m.course.drug}`, this.left, doc.y, {
        width: this.width,
      });
    doc
      .font('regular')
      .fontSize(9.5)
      .fillColor(MUTED)
      .text(
        `Plan ${m.plan.id}, version ${m.plan.version}  ·  ${STATUS_LABEL[m.plan.status]}  ·  ${describeTimeBase(m.timeBase, m.generatedAt)}`,
        { width: this.width },
      );
    if (m.plan.status !== 'countersigned') {
      doc.moveDown(0.3);
      doc
        .font('bold')
        .fontSize(10)
        .fillColor(CAUTION)
        .text(
          m.plan.status === 'superseded'
            ? 'SUPERSEDED: a later plan replaces this one. Do not act on this version.'
            : 'NOT COUNTERSIGNED: this plan has not been countersigned by a reviewing pharmacist.',
          { width: this.width },
        );
    }
    doc.fillColor(INK).font('regular').fontSize(9);
  }

  private statementBox(): void {
    const { doc } = this;
    doc.moveDown(0.7);
    const pad = 10;
    const innerW = this.width - 2 * pad - 6;
    doc.font('bold').fontSize(10.5);
    const h = doc.heightOfString(CLINICAL_JUDGEMENT_STATEMENT, { width: innerW }) + 2 * pad;
    const y = doc.y;
    doc.rect(this.left, y, this.width, h).fill(FILL);
    doc.rect(this.left, y, 6, h).fill(ACCENT);
    doc.rect(this.left, y, this.width, h).lineWidth(1.4).strokeColor(ACCENT).stroke();
    doc
      .fillColor(INK)
      .text(CLINICAL_JUDGEMENT_STATEMENT, this.left + 6 + pad, y + pad, { width: innerW });
    doc.y = y + h + 4;
    doc.x = this.left;
    doc.font('regular').fontSize(9);
  }

  private patientAndCourse(): void {
    const { m } = this;
    const p = m.patient;
    const c = m.course;
    const target =
      `${c.target.metric} ${c.target.low != null ? formatNumber(c.target.low) : ''}` +
      `${c.target.low != null && c.target.high != null ? '–' : ''}` +
      `${c.target.high != null ? formatNumber(c.target.high) : ''} ${c.target.unit}` +
      (c.target.note ? ` (${c.target.note})` : '');
    const pairs: Array<[string, string]> = [
      ['Patient', this.patientName()],
      ['Ward', p.ward ?? 'not recorded'],
    ];
    if (p.kind === 'patient') {
      pairs.push(['MRN', p.mrn ?? 'not recorded']);
      pairs.push(['Date of birth', p.dateOfBirth ?? 'not recorded']);
    }
    pairs.push(
      ['Sex', p.sex],
      ['Age', p.age ?? 'not recorded'],
      ['Drug', c.drug],
      ['Indication', c.indication ?? 'not recorded'],
      [
        'MIC',
        c.mic
          ? `${formatNumber(c.mic.value, 3)} ${c.mic.unit}${c.mic.method ? ` (${c.mic.method})` : ''}`
          : 'not known',
      ],
      ['Target', target.replace(/\s+/g, ' ').trim()],
      [
        'Model',
        `${c.model.name}, version ${c.model.version}${c.model.population ? ` (${c.model.population})` : ''}`,
      ],
      ['Model source', c.model.source],
    );
    if (c.startedAt) pairs.push(['Course start', this.t(c.startedAt)]);
    if (m.plan.recheckDueAt) pairs.push(['Re-check by', this.t(m.plan.recheckDueAt, true)]);
    this.heading('Patient and course', this.factsRowHeight(pairs.slice(0, 2)) + 3);
    this.facts(pairs);
  }

  private recommendation(): void {
    const { doc, m } = this;
    const chosen = m.regimens.find((r) => r.chosen);
    if (!chosen) {
      this.emptySection('Recommendation', 'No regimen has been chosen in this plan.');
      return;
    }
    const first = m.administration[0];
    const every = `every ${formatHours(chosen.intervalH)}`;
    const how =
      chosen.route === 'oral'
        ? `by mouth ${every}`
        : chosen.route === 'im'
          ? `intramuscularly ${every}`
          : chosen.route === 'iv-bolus' || chosen.infusionH === 0
            ? `by intravenous bolus ${every}`
            : `intravenously ${every}, each dose infused over ${formatHours(chosen.infusionH)}`;
    const portions =
      chosen.loadingPortions && chosen.loadingPortions > 1
        ? ` (in ${chosen.loadingPortions} portions; see the administration times)`
        : '';
    const line =
      `${m.course.drug} ${formatDoseMg(chosen.doseMg)} ${how}` +
      (chosen.loadingDoseMg
        ? `, after a loading dose of ${formatDoseMg(chosen.loadingDoseMg)}${portions}`
        : '') +
      (first
        ? `. First dose: ${formatClock(first.at, m.timeBase)} on ${formatDay(first.at, m.timeBase)}.`
        : '.');
    const predicted = `Predicted: AUC24 ${formatNumber(chosen.auc24, 0)} mg·h/L, peak ${formatConc(chosen.peak)}, trough ${formatConc(chosen.trough)}; target ${chosen.targetMet ? 'met' : 'NOT met'}.`;
    doc.font('bold').fontSize(10.5);
    const h1 = doc.heightOfString(line, { width: this.width - 16 });
    doc.font('regular').fontSize(9);
    const h2 = doc.heightOfString(predicted, { width: this.width - 16 });
    const h = h1 + h2 + 16;
    this.heading('Recommendation', h);
    this.ensureSpace(h);
    const y = doc.y;
    doc.rect(this.left, y, this.width, h).lineWidth(0.8).strokeColor(RULE).stroke();
    doc
      .font('bold')
      .fontSize(10.5)
      .fillColor(INK)
      .text(line, this.left + 8, y + 6, { width: this.width - 16 });
    doc
      .font('regular')
      .fontSize(9)
      .fillColor(INK)
      .text(predicted, this.left + 8, doc.y + 2, { width: this.width - 16 });
    doc.y = y + h + 2;
    doc.x = this.left;
    if (m.contingency) this.paragraph(`Contingency: ${m.contingency}`);
  }

  private warnings(): void {
    const { doc, m } = this;
    if (m.warnings.length === 0) {
      this.emptySection('Warnings and cautions', 'No warnings were raised for this plan.');
      return;
    }
    const label = (w: PlanReportModel['warnings'][number]) =>
      w.severity === 'warning' ? 'Warning' : 'Caution';
    const height = (w: PlanReportModel['warnings'][number]) => {
      doc.font('regular').fontSize(9);
      return doc.heightOfString(`${label(w)}: ${w.text}`, { width: this.width - 14 });
    };
    this.heading('Warnings and cautions', height(m.warnings[0]!) + 4);
    for (const w of m.warnings) {
      const h = height(w);
      this.ensureSpace(h + 4);
      const y = doc.y;
      doc.rect(this.left, y + 1, 4, h - 2).fill(w.severity === 'warning' ? CAUTION : MUTED);
      doc
        .font('bold')
        .fillColor(w.severity === 'warning' ? CAUTION : INK)
        .text(`${label(w)}: `, this.left + 10, y, {
          width: this.width - 14,
          continued: true,
        });
      doc.font('regular').fillColor(INK).text(w.text);
      doc.y = Math.max(doc.y, y + h) + 3;
    }
    doc.x = this.left;
  }

  private covariates(): void {
    const { m } = this;
    if (m.covariates.length === 0)
      return this.emptySection('Covariates', 'No covariates recorded.');
    this.tableSection(
      'Covariates',
      [
        { header: 'Covariate', width: 0.24 },
        { header: 'Value', width: 0.2, align: 'right' },
        { header: 'Used as', width: 0.16 },
        { header: 'Recorded', width: 0.22 },
        { header: 'Source', width: 0.18 },
      ],
      m.covariates.map((c) => [
        c.name,
        `${typeof c.value === 'number' ? formatNumber(c.value, 2) : c.value}${c.unit ? ` ${c.unit}` : ''}`,
        c.converted ?? '',
        c.observedAt ? this.t(c.observedAt) : 'not recorded',
        c.source ?? 'not recorded',
      ]),
    );
  }

  private derived(): void {
    const { m } = this;
    if (m.derived.length === 0) return this.emptySection('Derived values', 'No derived values.');
    this.tableSection(
      'Derived values',
      [
        { header: 'Value', width: 0.2 },
        { header: 'Result', width: 0.2, align: 'right' },
        { header: 'Formula and inputs', width: 0.6 },
      ],
      m.derived.map((d) => [
        d.name,
        `${formatNumber(d.value, 2)} ${d.unit}`,
        d.inputs ? `${d.formula}\nInputs: ${d.inputs}` : d.formula,
      ]),
    );
  }

  private doses(): void {
    const { m } = this;
    if (m.doses.length === 0) return this.emptySection('Doses', 'No doses recorded.');
    this.tableSection(
      'Doses',
      [
        { header: '#', width: 0.06, align: 'right' },
        { header: 'Start', width: 0.22 },
        { header: 'Amount', width: 0.2, align: 'right' },
        { header: 'Route', width: 0.14 },
        { header: 'Duration', width: 0.11, align: 'right' },
        { header: 'Status', width: 0.1 },
        { header: 'Note', width: 0.17 },
      ],
      m.doses.map((d, i) => [
        String(i + 1),
        this.t(d.startAt),
        formatDoseMg(d.amountMg),
        d.route,
        d.durationH != null ? formatHours(d.durationH) : '–',
        d.status,
        d.note ?? '',
      ]),
    );
  }

  private levels(): void {
    const { m } = this;
    if (m.levels.length === 0) return this.emptySection('Levels', 'No levels measured.');
    this.tableSection(
      'Levels',
      [
        { header: 'Sampled', width: 0.22 },
        { header: 'Result', width: 0.15, align: 'right' },
        { header: 'Validity', width: 0.15 },
        { header: 'Reason', width: 0.36 },
        { header: 'In fit', width: 0.12 },
      ],
      m.levels.map((l) => [
        this.t(l.sampledAt),
        `${l.belowLimit ? 'below ' : ''}${formatNumber(l.value, 2)} ${l.unit}`,
        l.verdict,
        l.reason ?? '',
        l.usedInFit ? 'yes' : 'no',
      ]),
    );
  }

  private fit(): void {
    const { m } = this;
    const fit = m.fit;
    if (!fit) return this.emptySection('Fit', 'No fit: this plan uses population values only.');
    const method = `Method: ${fit.method}`;
    const columns: Column[] = [
      { header: 'Parameter', width: 0.3 },
      { header: 'Estimate', width: 0.18, align: 'right' },
      { header: '90% interval', width: 0.26, align: 'right' },
      { header: 'Population', width: 0.26, align: 'right' },
    ];
    const rows = fit.estimates.map((e) => [
      e.name,
      `${formatNumber(e.value, 3)} ${e.unit}`,
      e.lower90 != null && e.upper90 != null
        ? `${formatNumber(e.lower90, 3)} to ${formatNumber(e.upper90, 3)} ${e.unit}`
        : 'not available',
      e.population != null ? `${formatNumber(e.population, 3)} ${e.unit}` : '',
    ]);
    const extra = [
      fit.objective != null
        ? `Objective (−2 log posterior): ${formatNumber(fit.objective, 2)}`
        : null,
      fit.shrinkage.length
        ? `Shrinkage: ${fit.shrinkage.map((s) => `${s.name} ${formatNumber(s.percent, 0)}%`).join(', ')}`
        : null,
      fit.note ?? null,
    ].filter(Boolean);
    const extraText = extra.join('   ·   ');
    // Heading, method caption, estimates and plot move to a new page together when they fit on
    // one; otherwise the heading keeps at least the caption, the header row and the first row.
    const lead = this.paragraphHeight(method) + this.lines(0.3);
    const whole =
      lead +
      this.tableHeight(columns, rows) +
      (extra.length ? this.lines(0.3) + this.paragraphHeight(extraText) : 0) +
      PLOT_SPACE;
    const headingH = this.headingHeight('Fit');
    this.heading(
      'Fit',
      headingH + whole <= this.pageBodyHeight
        ? whole
        : lead + this.tableHeight(columns, rows, {}, 1),
    );
    this.paragraph(method);
    this.doc.moveDown(0.3);
    this.table(columns, rows);
    if (extra.length) {
      this.doc.moveDown(0.3);
      this.paragraph(extraText, { color: MUTED });
    }
    this.plot(fit.plot);
  }

  /** Concentration–time plot drawn as vectors. */
  private plot(p: PlanReportPlot): void {
    const { doc } = this;
    this.ensureSpace(PLOT_SPACE);
    doc.moveDown(0.5);
    const top = doc.y;
    const box = { x: this.left + 46, y: top + 8, w: this.width - 56, h: 180 };

    const xs = [
      ...p.observed.map((o) => o.t),
      ...p.individual.map((o) => o.t),
      ...p.population.map((o) => o.t),
      ...p.band.map((b) => b.t),
      ...p.doseTimes,
    ];
    const ys = [
      ...p.observed.map((o) => o.c),
      ...p.individual.map((o) => o.c),
      ...p.population.map((o) => o.c),
      ...p.band.map((b) => b.upper),
    ];
    const xTicks = niceTicks(0, Math.max(1, ...xs), 8);
    const yTicks = niceTicks(0, Math.max(1, ...ys) * 1.05, 6);
    const xMax = xTicks[xTicks.length - 1]!;
    const yMax = yTicks[yTicks.length - 1]!;
    const X = (t: number) => box.x + (t / xMax) * box.w;
    const Y = (c: number) => box.y + box.h - (c / yMax) * box.h;

    // grid and ticks
    doc.lineWidth(0.3).strokeColor('#e2e6ea');
    for (const v of yTicks)
      doc
        .moveTo(box.x, Y(v))
        .lineTo(box.x + box.w, Y(v))
        .stroke();
    for (const v of xTicks)
      doc
        .moveTo(X(v), box.y)
        .lineTo(X(v), box.y + box.h)
        .stroke();
    doc.lineWidth(0.8).strokeColor(INK).rect(box.x, box.y, box.w, box.h).stroke();
    doc.font('regular').fontSize(7.5).fillColor(MUTED);
    for (const v of yTicks) {
      doc
        .moveTo(box.x - 3, Y(v))
        .lineTo(box.x, Y(v))
        .lineWidth(0.6)
        .strokeColor(INK)
        .stroke();
      doc.text(formatNumber(v, 2), box.x - 34, Y(v) - 4, {
        width: 28,
        align: 'right',
        lineBreak: false,
      });
    }
    for (const v of xTicks) {
      doc
        .moveTo(X(v), box.y + box.h)
        .lineTo(X(v), box.y + box.h + 3)
        .lineWidth(0.6)
        .strokeColor(INK)
        .stroke();
      doc.text(formatNumber(v, 1), X(v) - 15, box.y + box.h + 5, {
        width: 30,
        align: 'center',
        lineBreak: false,
      });
    }
    doc.fontSize(8.5).fillColor(INK);
    doc.text('Time since first dose (h)', box.x, box.y + box.h + 16, {
      width: box.w,
      align: 'center',
      lineBreak: false,
    });
    doc.save();
    doc.rotate(-90, { origin: [this.left + 6, box.y + box.h / 2] });
    doc.text('Concentration (mg/L)', this.left + 6 - box.h / 2, box.y + box.h / 2 - 4, {
      width: box.h,
      align: 'center',
      lineBreak: false,
    });
    doc.restore();

    // content, clipped to the plot box
    doc.save();
    doc.rect(box.x, box.y, box.w, box.h).clip();
    if (p.band.length > 1) {
      const first = p.band[0]!;
      doc.moveTo(X(first.t), Y(first.upper));
      for (const b of p.band.slice(1)) doc.lineTo(X(b.t), Y(b.upper));
      for (const b of [...p.band].reverse()) doc.lineTo(X(b.t), Y(b.lower));
      doc.closePath().fillOpacity(0.22).fill(ACCENT);
      doc.fillOpacity(1);
    }
    const line = (pts: Array<{ t: number; c: number }>) => {
      if (pts.length < 2) return false;
      doc.moveTo(X(pts[0]!.t), Y(pts[0]!.c));
      for (const q of pts.slice(1)) doc.lineTo(X(q.t), Y(q.c));
      return true;
    };
    if (line(p.population))
      doc.lineWidth(1).dash(4, { space: 3 }).strokeColor(MUTED).stroke().undash();
    if (line(p.individual)) doc.lineWidth(1.6).strokeColor(ACCENT).stroke();
    for (const o of p.observed) {
      doc.circle(X(o.t), Y(o.c), 3.2).lineWidth(1.2);
      if (o.usedInFit) doc.fillAndStroke(CAUTION, CAUTION);
      else doc.fillAndStroke('#ffffff', CAUTION);
    }
    doc.restore();
    // dose marks under the time axis
    for (const t of p.doseTimes) {
      const x = X(t);
      doc
        .moveTo(x, box.y + box.h - 7)
        .lineTo(x - 3, box.y + box.h)
        .lineTo(x + 3, box.y + box.h)
        .closePath()
        .fill(INK);
    }

    // legend, wrapping onto a second row when it does not fit
    let lx = box.x;
    let ly = box.y + box.h + 32;
    const item = (draw: (x: number, y: number) => void, label: string) => {
      doc.font('regular').fontSize(7.5);
      const w = 18 + doc.widthOfString(label) + 10;
      if (lx + w > box.x + box.w + 4) {
        lx = box.x;
        ly += 12;
      }
      draw(lx, ly + 4);
      doc
        .font('regular')
        .fontSize(7.5)
        .fillColor(INK)
        .text(label, lx + 18, ly, { lineBreak: false });
      lx += w;
    };
    item((x, y) => {
      doc.circle(x + 6, y, 3).fillAndStroke(CAUTION, CAUTION);
    }, 'Level (used in fit)');
    item((x, y) => {
      doc
        .circle(x + 6, y, 3)
        .lineWidth(1.2)
        .fillAndStroke('#ffffff', CAUTION);
    }, 'Level (not used)');
    item((x, y) => {
      doc
        .moveTo(x, y)
        .lineTo(x + 14, y)
        .lineWidth(1.6)
        .strokeColor(ACCENT)
        .stroke();
    }, 'Individual fit');
    item((x, y) => {
      doc
        .moveTo(x, y)
        .lineTo(x + 14, y)
        .lineWidth(1)
        .dash(4, { space: 3 })
        .strokeColor(MUTED)
        .stroke()
        .undash();
    }, 'Population');
    item((x, y) => {
      doc
        .rect(x, y - 4, 14, 8)
        .fillOpacity(0.22)
        .fill(ACCENT);
      doc.fillOpacity(1);
    }, p.bandLabel);
    item((x, y) => {
      doc
        .moveTo(x + 7, y - 4)
        .lineTo(x + 3, y + 3)
        .lineTo(x + 11, y + 3)
        .closePath()
        .fill(INK);
    }, 'Dose start');

    doc.y = ly + 16;
    doc.x = this.left;
    doc.font('regular').fontSize(9).fillColor(INK);
  }

  private regimens(): void {
    const { m } = this;
    if (m.regimens.length === 0)
      return this.emptySection('Regimens compared', 'No regimens were compared.');
    this.tableSection(
      'Regimens compared',
      [
        { header: 'Dose', width: 0.21, align: 'right' },
        { header: 'Every', width: 0.09, align: 'right' },
        { header: 'Infusion', width: 0.1, align: 'right' },
        { header: 'Loading', width: 0.14, align: 'right' },
        { header: 'Peak\nmg/L', width: 0.1, align: 'right' },
        { header: 'Trough\nmg/L', width: 0.1, align: 'right' },
        { header: 'AUC24\nmg·h/L', width: 0.11, align: 'right' },
        { header: 'Target', width: 0.15 },
      ],
      m.regimens.map((r) => [
        formatDoseMg(r.doseMg),
        formatHours(r.intervalH),
        r.route === 'oral' ? 'by mouth' : r.route === 'im' ? 'IM' : formatHours(r.infusionH),
        r.loadingDoseMg ? formatDoseMg(r.loadingDoseMg) : '–',
        formatNumber(r.peak, 1),
        formatNumber(r.trough, 1),
        formatNumber(r.auc24, 0),
        `${r.targetMet ? 'met' : 'not met'}${r.chosen ? ' – CHOSEN' : ''}`,
      ]),
      { highlight: (i) => m.regimens[i]?.chosen ?? false },
    );
  }

  private administration(): void {
    const { m } = this;
    if (m.administration.length === 0)
      return this.emptySection('Administration times', 'No administration times planned.');
    this.tableSection(
      'Administration times',
      [
        { header: 'Start', width: 0.26 },
        { header: 'Dose', width: 0.24, align: 'right' },
        { header: 'Infuse over', width: 0.14, align: 'right' },
        { header: 'Note', width: 0.36 },
      ],
      m.administration.map((a) => [
        this.t(a.at),
        formatDoseMg(a.doseMg),
        a.infusionH != null ? formatHours(a.infusionH) : '–',
        a.note ?? '',
      ]),
    );
    this.doc.moveDown(0.3);
    const route = m.regimens.find((r) => r.chosen)?.route;
    this.paragraph(
      route === 'oral' || route === 'im'
        ? 'Record the actual time every dose is given.'
        : 'Record the actual start and stop time of every infusion.',
      { color: MUTED },
    );
  }

  private sampling(): void {
    const { m } = this;
    if (m.sampling.length === 0)
      return this.emptySection('Next levels', 'No further levels planned.');
    this.tableSection(
      'Next levels',
      [
        { header: 'Draw at', width: 0.22 },
        { header: 'Level', width: 0.1 },
        { header: 'Timing', width: 0.68 },
      ],
      m.sampling.map((s) => {
        const off = Math.abs(s.anchor.offsetMinutes);
        const amount =
          off % 60 === 0
            ? `${off / 60} h`
            : off > 60
              ? `${formatNumber(off / 60, 2)} h`
              : `${off} min`;
        const rel = s.anchor.offsetMinutes >= 0 ? 'after' : 'before';
        const edge = s.anchor.edge === 'end' ? 'the END' : 'the START';
        const dose = `${formatClock(s.anchor.doseStartAt, m.timeBase)} dose on ${formatDay(s.anchor.doseStartAt, m.timeBase)}`;
        const timing =
          off === 0
            ? `Draw at ${edge} of the ${dose}.`
            : `Draw ${amount} ${rel} ${edge} of the ${dose}.`;
        return [this.t(s.drawAt), s.kind, s.instruction ? `${timing} ${s.instruction}` : timing];
      }),
    );
    this.doc.moveDown(0.3);
    this.paragraph(
      'Record the actual draw time. Do not hold a dose while awaiting a result unless told to.',
      { color: MUTED },
    );
  }

  private rationale(): void {
    const { m } = this;
    if (!m.rationale?.trim()) return this.emptySection('Rationale', 'No rationale recorded.');
    this.heading('Rationale', this.paragraphLead(m.rationale.trim()));
    this.paragraph(m.rationale.trim());
  }

  private signatureBlock(s: PlanReportModel['signatures'][number]): {
    lines: Array<[string, string]>;
    h: number;
  } {
    const { doc } = this;
    const lines: Array<[string, string]> = [
      ['Signed by', `${s.name}, ${s.role}`],
      ['Meaning', s.meaning],
      ['Date and time', this.t(s.signedAt, true)],
      ['Content hash', s.contentHash],
    ];
    if (s.comment) lines.push(['Comment', s.comment]);
    doc.fontSize(9);
    const valueW = this.width - 120;
    const h =
      lines.reduce(
        (sum, [, v]) => sum + doc.font('regular').heightOfString(v, { width: valueW }) + 2,
        0,
      ) + 12;
    return { lines, h };
  }

  private signatures(): void {
    const { doc, m } = this;
    const hashLine = `Plan content hash (SHA-256): ${m.plan.contentHash}`;
    const notSigned = 'Not signed.';
    const notCountersigned = 'Not countersigned by a reviewing pharmacist.';
    const warnNotCountersigned =
      m.signatures.length > 0 && !m.signatures.some((s) => s.meaning.startsWith('reviewed'));
    // The heading stays with the hash line and the first signature block (or its absence).
    const first = m.signatures[0];
    const firstBlock =
      this.paragraphHeight(hashLine, { size: 8 }) +
      this.lines(0.3) +
      (warnNotCountersigned ? this.paragraphHeight(notCountersigned, { font: 'bold' }) : 0) +
      (first
        ? this.signatureBlock(first).h + 6
        : this.paragraphLead(notSigned, { font: 'italic' }));
    this.heading('Signatures', firstBlock);
    this.paragraph(hashLine, { size: 8, color: MUTED });
    doc.moveDown(0.3);
    if (m.signatures.length === 0) return this.none(notSigned);
    if (warnNotCountersigned)
      this.paragraph(notCountersigned, {
        font: 'bold',
        color: CAUTION,
      });
    for (const s of m.signatures) {
      const { lines, h } = this.signatureBlock(s);
      const valueW = this.width - 120;
      this.ensureSpace(h + 6);
      const y = doc.y;
      doc.rect(this.left, y, this.width, h).lineWidth(0.8).strokeColor(RULE).stroke();
      doc.rect(this.left, y, 3, h).fill(s.meaning === 'returned' ? CAUTION : ACCENT);
      let yy = y + 6;
      for (const [k, v] of lines) {
        doc
          .font('bold')
          .fontSize(9)
          .fillColor(MUTED)
          .text(k, this.left + 12, yy, { width: 100 });
        doc
          .font(k === 'Signed by' || k === 'Meaning' ? 'bold' : 'regular')
          .fillColor(INK)
          .text(v, this.left + 112, yy, { width: valueW });
        yy = doc.y + 2;
      }
      doc.y = y + h + 6;
    }
    doc.x = this.left;
  }

  /**
   * Where the footer's parts go, measured so they never overlap: plan id, version and status on
   * the left, the generated time in the middle and "Page N of M" on the right when all three fit
   * on one line; otherwise the generated time moves to a second line. A plan id too long for the
   * line is shortened to its first characters (the title block prints it in full). x offsets
   * are from the left margin; rows are 0 or 1.
   */
  private footerLayout(
    w: number,
    total: number,
  ): {
    plan: string;
    planX: number;
    planRow: 0;
    generated: string;
    generatedX: number;
    generatedRow: 0 | 1;
  } {
    const { doc, m } = this;
    const gap = 14;
    doc.font('bold').fontSize(7.5);
    const pageW = doc.widthOfString(`Page ${total} of ${total}`);
    doc.font('regular').fontSize(7.5);
    const planLabel = (id: string) =>
      `Plan ${id} v${m.plan.version} · ${STATUS_LABEL[m.plan.status]}`;
    const fits = (text: string, room: number) => doc.widthOfString(text) <= room;
    const shortId = `${m.plan.id.slice(0, SHORT_ID_LENGTH)}…`;
    const generated = fitToWidth(
      doc,
      `Generated ${this.t(m.generatedAt, true)}${m.generatedBy ? ` by ${m.generatedBy}` : ''}`,
      w,
    );
    const genW = doc.widthOfString(generated);
    const full = planLabel(m.plan.id);
    // One line: the generated time centred in the space between plan label and page number.
    const planW = doc.widthOfString(full);
    if (planW + gap + genW + gap + pageW <= w) {
      const free = w - planW - pageW;
      const centred = (w - genW) / 2;
      const generatedX = Math.min(Math.max(centred, planW + gap), planW + free - gap - genW);
      return { plan: full, planX: 0, planRow: 0, generated, generatedX, generatedRow: 0 };
    }
    // Two lines: plan label and page number, then the generated time.
    const room = w - gap - pageW;
    const plan = fits(full, room)
      ? full
      : fitToWidth(doc, m.plan.id.length > SHORT_ID_LENGTH ? planLabel(shortId) : full, room);
    return { plan, planX: 0, planRow: 0, generated, generatedX: 0, generatedRow: 1 };
  }

  /** Header and footer on every page: "Page N of M", generated time, plan id and version. */
  private pageFurniture(): void {
    const { doc, m } = this;
    const range = doc.bufferedPageRange();
    const total = range.count;
    const who =
      m.patient.kind === 'teaching-case'
        ? 'Teaching case'
        : `${this.patientName()}${m.patient.mrn ? `, MRN ${m.patient.mrn}` : ''}`;
    for (let i = range.start; i < range.start + total; i++) {
      doc.switchToPage(i);
      const savedBottom = doc.page.margins.bottom;
      doc.page.margins.bottom = 0; // writing in the margin must not open a new page
      const w = doc.page.width - 2 * MARGIN;
      doc
        .font('bold')
        .fontSize(8)
        .fillColor(ACCENT)
        .text(m.hospitalName, MARGIN, MARGIN - 6, { width: w / 2, lineBreak: false });
      doc
        .font('regular')
        .fontSize(8)
        .fillColor(MUTED)
        .text(`Dosing plan: ${who}`, MARGIN + w / 2, MARGIN - 6, {
          width: w / 2,
          align: 'right',
          lineBreak: false,
        });
      doc
        .moveTo(MARGIN, MARGIN + 8)
        .lineTo(MARGIN + w, MARGIN + 8)
        .lineWidth(0.5)
        .strokeColor(RULE)
        .stroke();

      const fy = doc.page.height - MARGIN - 6;
      doc
        .moveTo(MARGIN, fy - 6)
        .lineTo(MARGIN + w, fy - 6)
        .lineWidth(0.5)
        .strokeColor(RULE)
        .stroke();
      const footer = this.footerLayout(w, total);
      const pageLabel = `Page ${i - range.start + 1} of ${total}`;
      doc.font('regular').fontSize(7.5).fillColor(MUTED);
      doc.text(footer.plan, MARGIN + footer.planX, fy + footer.planRow * 10, { lineBreak: false });
      doc.text(footer.generated, MARGIN + footer.generatedX, fy + footer.generatedRow * 10, {
        lineBreak: false,
      });
      doc.font('bold').fillColor(INK);
      doc.text(pageLabel, MARGIN + w - doc.widthOfString(pageLabel), fy, { lineBreak: false });
      doc.page.margins.bottom = savedBottom;
    }
  }
}

/** `text`, cut with an ellipsis where needed so that it is at most `width` wide in the current font. */
function fitToWidth(doc: Doc, text: string, width: number): string {
  if (doc.widthOfString(text) <= width) return text;
  let n = text.length;
  while (n > 1 && doc.widthOfString(`${text.slice(0, n)}…`) > width) n--;
  return `${text.slice(0, n)}…`;
}

/** Round tick values covering [min, max] with about `count` steps (1, 2, 2.5 or 5 × 10^k). */
export function niceTicks(min: number, max: number, count: number): number[] {
  const span = max - min || 1;
  const raw = span / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = ([1, 2, 2.5, 5, 10].find((s) => s * mag >= raw) ?? 10) * mag;
  const ticks: number[] = [];
  for (let v = Math.floor(min / step) * step; v < max + step - 1e-9; v += step) {
    ticks.push(Number(v.toFixed(10)));
    if (v >= max) break;
  }
  return ticks;
}
