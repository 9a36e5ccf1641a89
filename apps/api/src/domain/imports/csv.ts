import Papa from 'papaparse';
import {
  administrationStatusSchema,
  csvDoseFields,
  csvLevelFields,
  doseRouteSchema,
  sampleKindSchema,
  type CsvImportKind,
  type CsvImportResponse,
  type CsvMapping,
  type ImportRow,
} from '@ebbtide/contracts';
import { recordAudit } from '../../data-access/audit';
import { databaseErrorKind, inTransaction, type Conn } from '../../data-access/casework-db';
import { dosesOfCourse, insertDoses, type DoseRecord } from '../../data-access/doses-repo';
import { insertLevels, levelsOfCourse, type LevelRecord } from '../../data-access/levels-repo';
import { AppError } from '../../lib/app-error';
import { requireCourse, type CourseContext } from '../courses/courses';
import type { DoseInput } from '../doses/checks';
import { checkDoseBatch, doseColumns } from '../doses/doses';
import type { LevelInput } from '../levels/checks';
import { checkLevelBatch, infusionsOf, levelColumns } from '../levels/levels';
import { assertMayWrite, auditActor, type CaseworkActor } from '../patients/common';

/** Header words that suggest each of our fields (lower-case, spaces and punctuation removed). */
const SYNONYMS: Record<string, string[]> = {
  start: [
    'start',
    'starttime',
    'startat',
    'givenat',
    'given',
    'administered',
    'administeredat',
    'time',
    'datetime',
    'starthour',
    'hour',
  ],
  amount: ['amount', 'dose', 'doseamount', 'quantity'],
  unit: ['unit', 'units', 'doseunit', 'ucum'],
  route: ['route'],
  infusionMinutes: [
    'infusionminutes',
    'duration',
    'durationmin',
    'durationminutes',
    'minutes',
    'infusionduration',
  ],
  end: ['end', 'endtime', 'endat', 'stop', 'stoptime', 'endhour'],
  administrationStatus: ['status', 'administrationstatus', 'given/missed'],
  note: ['note', 'notes', 'comment', 'comments'],
  collected: [
    'collected',
    'collectedat',
    'collectiontime',
    'sampletime',
    'drawn',
    'drawnat',
    'time',
    'datetime',
    'collectedhour',
    'hour',
  ],
  value: ['value', 'result', 'level', 'concentration'],
  sampleKind: ['samplekind', 'kind', 'sample', 'sampletype', 'type', 'timing'],
  assayLowerLimit: ['assaylowerlimit', 'lloq', 'lowerlimit', 'lod'],
  fraction: ['fraction', 'totalfree'],
};

const REQUIRED: Record<CsvImportKind, string[]> = {
  doses: ['start', 'amount', 'unit', 'route'],
  levels: ['collected', 'value', 'unit', 'sampleKind'],
};

const normalise = (h: string) => h.toLowerCase().replace(/[^a-z/]/g, '');

/** Suggests a column for each field from the header. */
export function suggestMapping(kind: CsvImportKind, columns: string[]): CsvMapping {
  const fields: readonly string[] = kind === 'doses' ? csvDoseFields : csvLevelFields;
  const mapping: CsvMapping = {};
  const used = new Set<string>();
  for (const field of fields) {
    const words = SYNONYMS[field] ?? [field.toLowerCase()];
    const col = columns.find((c) => !used.has(c) && words.includes(normalise(c)));
    mapping[field] = col ?? null;
    if (col) used.add(col);
  }
  return mapping;
}

/** Display variants accepted for UCUM codes in files. */
const UNIT_ALIASES: Record<string, string> = {
  mg: 'mg',
  g: 'g',
  'mg/L': 'mg/L',
  'mg/l': 'mg/L',
  'ug/mL': 'ug/mL',
  'µg/mL': 'ug/mL',
  'ug/ml': 'ug/mL',
  'umol/L': 'umol/L',
  'µmol/L': 'umol/L',
  'umol/l': 'umol/L',
};

export interface ParsedCsv {
  columns: string[];
  records: Array<Record<string, string>>;
}

export function parseCsv(text: string): ParsedCsv {
  const result = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ''), {
    header: true,
    skipEmptyLines: 'greedy',
    transformHeader: (h) => h.trim(),
  });
  const fatal = result.errors.find(
    (e) => e.type === 'Delimiter' || e.code === 'UndetectableDelimiter',
  );
  if (fatal && result.data.length === 0) {
    throw new AppError('validation-failed', 'The file is not a readable CSV', 400, {
      fieldErrors: { file: [fatal.message] },
    });
  }
  return { columns: result.meta.fields ?? [], records: result.data };
}

const TIME_WITH_OFFSET = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/;

/** Reads one time cell: an ISO date-time with offset (real) or hours (teaching). */
function readTime(
  cell: string,
  isTeaching: boolean,
  reasons: string[],
  label: string,
): { at?: string; hour?: number } {
  const v = cell.trim();
  if (v === '') {
    reasons.push(`${label}: missing`);
    return {};
  }
  if (isTeaching) {
    const h = Number(v);
    if (!Number.isFinite(h))
      reasons.push(`${label}: "${v}" is not a number of hours from the first dose`);
    return { hour: h };
  }
  if (!TIME_WITH_OFFSET.test(v)) {
    reasons.push(
      `${label}: "${v}" is not a date-time with a UTC offset (e.g. 2026-12-01T08:00+13:00)`,
    );
    return {};
  }
  return { at: new Date(v.replace(' ', 'T')).toISOString() };
}

function readNumber(
  cell: string | undefined,
  reasons: string[],
  label: string,
  required: boolean,
): number | undefined {
  const v = (cell ?? '').trim();
  if (v === '') {
    if (required) reasons.push(`${label}: missing`);
    return undefined;
  }
  const n = Number(v);
  if (!Number.isFinite(n)) {
    reasons.push(`${label}: "${v}" is not a number`);
    return undefined;
  }
  return n;
}

const flatten = (errors: Record<string, string[]>) =>
  Object.entries(errors).flatMap(([f, ms]) => ms.map((m) => `${f}: ${m}`));

interface PreparedRow {
  row: ImportRow;
  dose?: DoseInput;
  level?: LevelInput;
}

function readDoseRow(
  rec: Record<string, string>,
  mapping: CsvMapping,
  isTeaching: boolean,
  reasons: string[],
): DoseInput | undefined {
  const cell = (f: string) => (mapping[f] ? (rec[mapping[f] as string] ?? '') : '');
  const start = readTime(cell('start'), isTeaching, reasons, 'start');
  const amount = readNumber(cell('amount'), reasons, 'amount', true);
  const unitRaw = cell('unit').trim();
  const unit = UNIT_ALIASES[unitRaw];
  if (unit !== 'mg' && unit !== 'g') reasons.push(`unit: unknown unit "${unitRaw}" (use mg or g)`);
  const route = doseRouteSchema.safeParse(cell('route').trim().toLowerCase());
  if (!route.success)
    reasons.push(`route: unknown route "${cell('route')}" (iv-infusion, iv-bolus, oral, im)`);
  const infusionMinutes = readNumber(cell('infusionMinutes'), reasons, 'infusionMinutes', false);
  const endCell = cell('end').trim();
  const end = endCell ? readTime(endCell, isTeaching, reasons, 'end') : {};
  const statusCell = cell('administrationStatus').trim().toLowerCase();
  const status = administrationStatusSchema.safeParse(statusCell || 'given');
  if (!status.success)
    reasons.push(`administrationStatus: unknown status "${statusCell}" (given, missed, partial)`);
  if (reasons.length || amount === undefined || !route.success || !status.success) return undefined;
  return {
    amount,
    unit: unit as 'mg' | 'g',
    route: route.data,
    startAt: start.at,
    startHour: start.hour,
    infusionMinutes,
    endAt: end.at,
    endHour: end.hour,
    administrationStatus: status.data,
    note: cell('note').trim() || undefined,
  };
}

function readLevelRow(
  rec: Record<string, string>,
  mapping: CsvMapping,
  isTeaching: boolean,
  reasons: string[],
): LevelInput | undefined {
  const cell = (f: string) => (mapping[f] ? (rec[mapping[f] as string] ?? '') : '');
  const collected = readTime(cell('collected'), isTeaching, reasons, 'collected');
  const value = readNumber(cell('value'), reasons, 'value', true);
  if (value !== undefined && value < 0) reasons.push('value: a level cannot be negative');
  const unitRaw = cell('unit').trim();
  const unit = UNIT_ALIASES[unitRaw];
  if (unit !== 'mg/L' && unit !== 'ug/mL' && unit !== 'umol/L')
    reasons.push(`unit: unknown unit "${unitRaw}" (use mg/L, ug/mL or umol/L)`);
  const kind = sampleKindSchema.safeParse(cell('sampleKind').trim().toLowerCase());
  if (!kind.success) reasons.push(`sampleKind: unknown sample kind "${cell('sampleKind')}"`);
  const lloq = readNumber(cell('assayLowerLimit'), reasons, 'assayLowerLimit', false);
  const fractionCell = cell('fraction').trim().toLowerCase() || 'total';
  if (fractionCell !== 'total' && fractionCell !== 'free')
    reasons.push(`fraction: "${fractionCell}" is not total or free`);
  if (reasons.length || value === undefined || !kind.success) return undefined;
  return {
    value,
    unit: unit as LevelInput['unit'],
    collectedAt: collected.at,
    collectedHour: collected.hour,
    sampleKind: kind.data,
    fraction: fractionCell as 'total' | 'free',
    assayLowerLimit: lloq ?? null,
    note: cell('note').trim() || undefined,
  };
}

async function prepare(
  db: Conn,
  ctx: CourseContext,
  kind: CsvImportKind,
  parsed: ParsedCsv,
  mapping: CsvMapping,
  now: Date,
): Promise<{ prepared: PreparedRow[]; missingFields: string[] }> {
  const missingFields = REQUIRED[kind].filter((f) => !mapping[f]);
  for (const [field, col] of Object.entries(mapping)) {
    if (col && !parsed.columns.includes(col))
      missingFields.push(`${field} (column "${col}" is not in the file)`);
  }
  const isTeaching = ctx.course.isTeaching;
  const prepared: PreparedRow[] = parsed.records.map((rec, i) => {
    const reasons: string[] = [];
    const values = Object.fromEntries(
      Object.entries(mapping)
        .filter(([, c]) => c)
        .map(([f, c]) => [f, rec[c as string] ?? null]),
    );
    const row: ImportRow = { rowNumber: i + 2, status: 'accepted', reasons, values, echo: null };
    if (missingFields.length) {
      reasons.push(`columns not mapped: ${missingFields.join(', ')}`);
      return { row };
    }
    if (kind === 'doses') return { row, dose: readDoseRow(rec, mapping, isTeaching, reasons) };
    return { row, level: readLevelRow(rec, mapping, isTeaching, reasons) };
  });
  if (kind === 'doses') {
    const readable = prepared.filter((p) => p.dose);
    const checks = checkDoseBatch(
      ctx,
      await dosesOfCourse(db, ctx.course.id),
      readable.map((p) => p.dose as DoseInput),
      now,
    );
    readable.forEach((p, i) => {
      const c = checks[i];
      if (c && !c.ok) {
        p.row.reasons.push(...flatten(c.errors));
        delete p.dose;
      } else if (c?.ok) p.row.echo = c.dose.echo;
    });
  } else {
    const readable = prepared.filter((p) => p.level);
    const infusions = infusionsOf(await dosesOfCourse(db, ctx.course.id));
    const checks = checkLevelBatch(
      ctx,
      infusions,
      await levelsOfCourse(db, ctx.course.id),
      readable.map((p) => p.level as LevelInput),
      now,
    );
    readable.forEach((p, i) => {
      const c = checks[i];
      if (c && !c.ok) {
        p.row.reasons.push(...flatten(c.errors));
        delete p.level;
      } else if (c?.ok) {
        p.row.echo = c.level.echo;
        if (c.level.flags.length)
          p.row.reasons.push(`kept with flags: ${c.level.flags.join(', ')}`);
      }
    });
  }
  for (const p of prepared) {
    const refused = !p.dose && !p.level;
    p.row.status = refused ? 'refused' : 'accepted';
  }
  return { prepared, missingFields };
}

/**
 * CSV import of doses or levels into a course. `preview` marks every refused row with its
 * reasons; `commit` is all-or-nothing: any refused row refuses the whole file, and the inserts
 * run in one transaction (each with its audit row), so a failure half-way leaves nothing behind.
 */
export async function importCsv(
  db: Conn,
  actor: CaseworkActor,
  courseId: string,
  request: { kind: CsvImportKind; mode: 'preview' | 'commit'; mapping?: CsvMapping; text: string },
  now = new Date(),
): Promise<CsvImportResponse> {
  const ctx = await requireCourse(db, actor, courseId);
  assertMayWrite(actor, ctx.course.isTeaching);
  const parsed = parseCsv(request.text);
  const mapping = request.mapping ?? suggestMapping(request.kind, parsed.columns);
  const { prepared, missingFields } = await prepare(db, ctx, request.kind, parsed, mapping, now);
  const rows = prepared.map((p) => p.row);
  const refusedCount = rows.filter((r) => r.status === 'refused').length;
  const response: CsvImportResponse = {
    kind: request.kind,
    columns: parsed.columns,
    mapping,
    missingFields,
    rows,
    acceptedCount: rows.length - refusedCount,
    refusedCount,
    committed: false,
    createdIds: [],
  };
  if (request.mode === 'preview') return response;
  if (rows.length === 0) {
    throw new AppError('import-refused', 'The file has no rows to import', 400, {
      fieldErrors: { file: ['no data rows'] },
      preview: response,
    });
  }
  if (refusedCount > 0 || missingFields.length > 0) {
    throw new AppError(
      'import-refused',
      `Nothing was imported: ${refusedCount} of ${rows.length} rows were refused. Fix them (see each row's reasons) and upload again.`,
      400,
      { preview: response },
    );
  }
  const createdIds = await inTransaction(db, async (trx) => {
    const ids: string[] = [];
    for (const p of prepared) {
      try {
        // Re-check inside the transaction so the all-or-nothing commit sees the latest rows.
        let created: DoseRecord | LevelRecord | undefined;
        if (p.dose) {
          const [check] = checkDoseBatch(
            ctx,
            await dosesOfCourse(trx, ctx.course.id),
            [p.dose],
            now,
          );
          if (!check?.ok)
            throw new AppError(
              'import-failed',
              `row ${p.row.rowNumber}: ${flatten(check?.errors ?? {}).join('; ')}`,
              400,
            );
          [created] = await insertDoses(trx, [doseColumns(ctx, check.dose, 'csv', actor.userId)]);
        } else if (p.level) {
          const infusions = infusionsOf(await dosesOfCourse(trx, ctx.course.id));
          const [check] = checkLevelBatch(
            ctx,
            infusions,
            await levelsOfCourse(trx, ctx.course.id),
            [p.level],
            now,
          );
          if (!check?.ok)
            throw new AppError(
              'import-failed',
              `row ${p.row.rowNumber}: ${flatten(check?.errors ?? {}).join('; ')}`,
              400,
            );
          [created] = await insertLevels(trx, [
            levelColumns(ctx, check.level, 'csv', actor.userId),
          ]);
        }
        if (!created) continue;
        ids.push(created.id);
        await recordAudit(trx, {
          actor: auditActor(actor),
          action: request.kind === 'doses' ? 'dose.create' : 'level.create',
          entityType: request.kind === 'doses' ? 'dose' : 'level',
          entityId: created.id,
          after: created,
          context: { courseId, import: 'csv', rowNumber: p.row.rowNumber },
        });
      } catch (error) {
        if (error instanceof AppError) throw error;
        const kind = databaseErrorKind(error);
        if (kind) {
          throw new AppError(
            'import-failed',
            `Nothing was imported: row ${p.row.rowNumber} was refused by the database (${kind.kind} ${kind.constraint})`,
            400,
            { rowNumber: p.row.rowNumber },
          );
        }
        throw error;
      }
    }
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'import.csv',
      entityType: 'course',
      entityId: courseId,
      context: { kind: request.kind, rows: ids.length, mapping },
    });
    return ids;
  });
  return { ...response, committed: true, createdIds };
}
