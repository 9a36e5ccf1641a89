import type { PlanChange, PlanChanges } from '@ebbtide/contracts';
import type { Conn } from '../../data-access/casework-db';
import { findPlan, lastCountersignedPlan, type PlanRecord } from '../../data-access/plans-repo';
import { notFound } from '../../lib/app-error';
import type { CaseworkActor } from '../patients/common';
import { toPlanSummary, type PlanContent } from '../plans/plans';

const num = (x: number | null | undefined, unit = '') =>
  x === null || x === undefined ? null : `${Number(x.toPrecision(4))}${unit ? ` ${unit}` : ''}`;

function push(
  out: PlanChange[],
  area: PlanChange['area'],
  field: string,
  before: string | null,
  after: string | null,
) {
  if (before !== after) out.push({ area, field, before, after });
}

type Basis = NonNullable<PlanContent['basis']>;

function doseText(d: Basis['doses'][number]): string {
  return `${d.amountMg} mg ${d.route}${d.durationH ? ` over ${d.durationH} h` : ''} at ${d.startAt ?? '—'} (${d.status})`;
}
function levelText(l: Basis['levels'][number]): string {
  return `${l.valueMgL} mg/L ${l.sampleKind} at ${l.collectedAt ?? '—'}${l.used ? '' : ' (not used)'}`;
}
function covariateText(c: Basis['covariates'][number]): string {
  return `${num(c.canonicalValue) ?? c.detail ?? '—'}${c.detail && c.canonicalValue !== null ? ` (${c.detail})` : ''} on ${c.observedAt ?? '—'}`;
}

/** Row-by-row comparison of two lists of engine inputs, by id and version. */
function diffRows<T extends { id: string }>(
  out: PlanChange[],
  label: string,
  before: T[],
  after: T[],
  text: (row: T) => string,
) {
  const old = new Map(before.map((r) => [r.id, r]));
  const now = new Map(after.map((r) => [r.id, r]));
  for (const [id, row] of now) {
    const prev = old.get(id);
    if (!prev) push(out, 'inputs', `${label} added`, null, text(row));
    else push(out, 'inputs', `${label} changed`, text(prev), text(row));
  }
  for (const [id, row] of old) {
    if (!now.has(id)) push(out, 'inputs', `${label} removed`, text(row), null);
  }
}

/** What changed from plan `a` (the last countersigned one) to plan `b`. */
export function diffPlans(a: PlanContent, b: PlanContent): PlanChange[] {
  const out: PlanChange[] = [];
  const ma = a.basis?.model;
  const mb = b.basis?.model;
  push(
    out,
    'model',
    'Drug model',
    ma ? `${ma.id} v${ma.version}` : null,
    mb ? `${mb.id} v${mb.version}` : null,
  );
  push(out, 'model', 'Method', a.basis?.method ?? null, b.basis?.method ?? null);
  for (const key of new Set([
    ...Object.keys(a.basis?.parameters ?? {}),
    ...Object.keys(b.basis?.parameters ?? {}),
  ])) {
    push(
      out,
      'model',
      `Parameter ${key}`,
      num(a.basis?.parameters[key]),
      num(b.basis?.parameters[key]),
    );
  }
  push(out, 'target', 'Target', JSON.stringify(a.target), JSON.stringify(b.target));
  push(
    out,
    'regimen',
    'Maintenance dose',
    num(a.regimen.doseMg, 'mg'),
    num(b.regimen.doseMg, 'mg'),
  );
  push(out, 'regimen', 'Interval', num(a.regimen.intervalH, 'h'), num(b.regimen.intervalH, 'h'));
  push(
    out,
    'regimen',
    'Infusion duration',
    num(a.regimen.infusionH, 'h'),
    num(b.regimen.infusionH, 'h'),
  );
  push(
    out,
    'regimen',
    'Infusion rate',
    num(a.regimen.infusionRateMgPerH, 'mg/h'),
    num(b.regimen.infusionRateMgPerH, 'mg/h'),
  );
  push(
    out,
    'regimen',
    'Loading dose',
    num(a.regimen.loadingDoseMg, 'mg'),
    num(b.regimen.loadingDoseMg, 'mg'),
  );
  push(
    out,
    'regimen',
    'Administration times',
    a.regimen.clockTimes.join(', '),
    b.regimen.clockTimes.join(', '),
  );
  push(out, 'regimen', 'First dose', a.regimen.firstDoseAt, b.regimen.firstDoseAt);
  push(
    out,
    'regimen',
    'Predicted AUC24',
    num(a.basis?.predicted.auc24, 'mg·h/L'),
    num(b.basis?.predicted.auc24, 'mg·h/L'),
  );
  push(
    out,
    'sampling',
    'Levels to draw',
    a.sampling.map((s) => s.label).join('; ') || null,
    b.sampling.map((s) => s.label).join('; ') || null,
  );
  diffRows(out, 'Dose', a.basis?.doses ?? [], b.basis?.doses ?? [], doseText);
  diffRows(out, 'Level', a.basis?.levels ?? [], b.basis?.levels ?? [], levelText);
  const cov = (c: Basis['covariates']) => c.map((x) => ({ ...x, id: x.id }));
  diffRows(
    out,
    'Covariate',
    cov(a.basis?.covariates ?? []),
    cov(b.basis?.covariates ?? []),
    (c) => `${c.kind}: ${covariateText(c)}`,
  );
  return out;
}

/** GET /api/plans/:id/changes — what changed since the course's last countersigned plan. */
export async function planChanges(
  db: Conn,
  actor: CaseworkActor,
  id: string,
): Promise<PlanChanges> {
  const plan: PlanRecord | undefined = await findPlan(db, actor, id);
  if (!plan) throw notFound('Plan');
  const previous = await lastCountersignedPlan(db, plan.courseId, plan.id);
  if (!previous || (plan.countersignedAt && previous.countersignedAt! > plan.countersignedAt)) {
    return { comparedWith: null, changes: [] };
  }
  return {
    comparedWith: toPlanSummary(previous),
    changes: diffPlans(
      previous.content as unknown as PlanContent,
      plan.content as unknown as PlanContent,
    ),
  };
}
