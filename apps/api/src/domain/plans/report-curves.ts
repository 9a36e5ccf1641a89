import type { DerivedValues, PlannedRegimen } from '@ebbtide/contracts';
import {
  simulate,
  type Dose,
  type DrugModelEntry,
  type ModelStructure,
  type PkParameters,
} from '@ebbtide/kinetics';
import type { PlanReportModel, PlanReportPlot } from '../../reports/plan-report-model';
import type { PlanEngineBasis } from './engine-basis';

const HOUR_MS = 3_600_000;
/** Points per recomputed curve: smooth at report size, cheap to integrate. */
const CURVE_POINTS = 300;

const fmt = (v: number, digits = 1) => Number(v.toFixed(digits)).toString();

/**
 * The patient screen's derived values (domain/covariates/derived.ts `computeDerived`) as report
 * rows, each with its formula, the inputs that went in and the published source.
 */
export function reportDerivedValues(
  d: DerivedValues,
  options: { crclUsedByModel: boolean },
): PlanReportModel['derived'] {
  const rows: PlanReportModel['derived'] = [];
  const scr =
    d.inputs.serumCreatinineUmolL !== null && d.inputs.serumCreatinineMgDl !== null
      ? `SCr ${fmt(d.inputs.serumCreatinineUmolL, 0)} µmol/L (${fmt(d.inputs.serumCreatinineMgDl, 2)} mg/dL)`
      : null;
  const body = [
    d.inputs.weightKg !== null ? `total body weight ${fmt(d.inputs.weightKg)} kg` : null,
    d.inputs.heightCm !== null ? `height ${fmt(d.inputs.heightCm, 0)} cm` : null,
  ].filter(Boolean);
  const crcl = d.creatinineClearance;
  if (crcl) {
    rows.push({
      name: 'Creatinine clearance',
      value: crcl.value,
      unit: 'mL/min',
      formula: `Cockcroft-Gault: ${crcl.formula}`,
      inputs: [
        `${crcl.weightUsed} body weight ${fmt(crcl.weightKg)} kg used`,
        `age ${d.inputs.ageYears} y, ${d.inputs.sex}`,
        scr,
        options.crclUsedByModel ? "the model's CRCL covariate" : null,
        `Source: ${crcl.source}`,
      ]
        .filter(Boolean)
        .join('; '),
    });
  }
  const kg = (name: string, abbreviation: string, v: DerivedValues['idealBodyWeight']) => {
    if (v) {
      rows.push({
        name,
        value: v.value,
        unit: 'kg',
        formula: v.formula.startsWith(abbreviation) ? v.formula : `${abbreviation}: ${v.formula}`,
        inputs: [...body, `Source: ${v.source}`].join('; '),
      });
    }
  };
  kg('Ideal body weight', 'IBW', d.idealBodyWeight);
  kg('Adjusted body weight', 'AdjBW', d.adjustedBodyWeight);
  kg('Lean body weight', 'LBW', d.leanBodyWeight);
  if (d.bodySurfaceArea) {
    rows.push({
      name: 'Body surface area',
      value: d.bodySurfaceArea.value,
      unit: 'm²',
      formula: `BSA: ${d.bodySurfaceArea.formula}`,
      inputs: [...body, `Source: ${d.bodySurfaceArea.source}`].join('; '),
    });
  }
  if (d.egfr) {
    rows.push({
      name: 'eGFR',
      value: d.egfr.value,
      unit: 'mL/min/1.73 m²',
      formula: d.egfr.formula,
      inputs: [`age ${d.inputs.ageYears} y, ${d.inputs.sex}`, scr, `Source: ${d.egfr.source}`]
        .filter(Boolean)
        .join('; '),
    });
  }
  return rows;
}

/** Stored dose rows and the planned regimen as engine doses, in hours since `originAt`. */
export function basisDoses(
  entry: DrugModelEntry,
  basis: PlanEngineBasis,
  regimen: PlannedRegimen,
  originAt: string,
): Dose[] {
  // Same conventions as the casework engine (domain/engine/context.ts): missed doses left out,
  // amounts as the salt form multiplied by the model's salt factor.
  const salt = entry.practical?.saltFactor ?? 1;
  const h = (at: string) => (Date.parse(at) - Date.parse(originAt)) / HOUR_MS;
  const dose = (at: string, amountMg: number, route: string, durationH: number | null): Dose => {
    const amount = amountMg * salt;
    if (route === 'iv-infusion' && durationH)
      return { time: h(at), amount, route: 'infusion', duration: durationH };
    if (route === 'iv-bolus' || route === 'iv-infusion')
      return { time: h(at), amount, route: 'bolus' };
    return { time: h(at), amount, route: 'oral' };
  };
  return [
    ...basis.doses
      .filter((d) => d.status !== 'missed' && d.startAt !== null)
      .map((d) => dose(d.startAt!, d.amountMg, d.route, d.durationH)),
    ...regimen.doses.map((d) => dose(d.startAt, d.doseMg, regimen.route, regimen.infusionH)),
  ].sort((a, b) => a.time - b.time);
}

/**
 * The plot's population curve and uncertainty band, recomputed with @ebbtide/kinetics from the
 * plan's stored engine basis (model, parameters, population parameters, 90% intervals, doses) and
 * its planned regimen, over the same span as the stored individual profile. The band is the one
 * the fit screen draws: the individual curve at the ends of the CL and V1 90% intervals (other
 * parameters at their estimate), taking the lowest and highest at each time.
 */
export function reportCurves(
  entry: DrugModelEntry,
  basis: PlanEngineBasis,
  regimen: PlannedRegimen,
  originAt: string,
): Pick<PlanReportPlot, 'population' | 'band' | 'bandLabel'> {
  const structure = entry.structure as ModelStructure;
  const doses = basisDoses(entry, basis, regimen, originAt);
  const none = { population: [], band: [], bandLabel: 'no interval computed' };
  if (doses.length === 0) return none;
  const profileEnd = (basis.profile ?? [])
    .filter((p) => p.at)
    .map((p) => (Date.parse(p.at!) - Date.parse(originAt)) / HOUR_MS)
    .reduce((m, t) => Math.max(m, t), -Infinity);
  const last = doses.at(-1)!;
  const to = Number.isFinite(profileEnd) ? profileEnd : last.time + regimen.intervalH;
  const from = Math.max(0, doses[0]!.time);
  if (!(to > from)) return none;
  const step = (to - from) / (CURVE_POINTS - 1);
  const times = Array.from({ length: CURVE_POINTS }, (_, i) => from + i * step);
  const run = (p: Record<string, number>) =>
    simulate({
      model: structure,
      parameters: p as unknown as PkParameters,
      doses,
      outputTimes: times,
      options: { estimateError: false },
    }).concentrations;
  const population = basis.populationParameters
    ? run(basis.populationParameters).map((c, i) => ({ t: times[i]!, c }))
    : [];
  const u = basis.uncertainty;
  const volumeKey = basis.parameters.V1 !== undefined ? 'V1' : 'V';
  const cls = u?.CL ? [u.CL.low, u.CL.high] : [basis.parameters.CL];
  const vs = u?.[volumeKey] ? [u[volumeKey].low, u[volumeKey].high] : [basis.parameters[volumeKey]];
  if (!u || (!u.CL && !u[volumeKey])) return { ...none, population };
  let low: number[] | null = null;
  let high: number[] | null = null;
  for (const CL of cls)
    for (const V of vs) {
      const c = run({
        ...basis.parameters,
        ...(CL !== undefined ? { CL } : {}),
        ...(V !== undefined ? { [volumeKey]: V } : {}),
      });
      low = low ? low.map((x, i) => Math.min(x, c[i]!)) : c.slice();
      high = high ? high.map((x, i) => Math.max(x, c[i]!)) : c.slice();
    }
  return {
    population,
    band: times.map((t, i) => ({ t, lower: low![i]!, upper: high![i]! })),
    bandLabel: `Approx. 90% band (ends of the CL and ${volumeKey} 90% intervals)`,
  };
}
