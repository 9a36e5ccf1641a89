import { compileCovariateExpression } from './expression';
import type { DrugModelEntry, LibraryParameterName } from './types';

/** One problem found in a library entry: the field path and what is wrong. */
export interface EntryProblem {
  readonly field: string;
  readonly message: string;
}

/** Result of `validateDrugModel`: `ok` when `problems` is empty. */
export interface EntryValidation {
  readonly ok: boolean;
  readonly problems: readonly EntryProblem[];
}

const PARAMETER_NAMES: readonly LibraryParameterName[] = [
  'CL',
  'V1',
  'Q',
  'V2',
  'ka',
  'F',
  'tlag',
  'Vmax',
  'Km',
];
const ROUTES = ['bolus', 'infusion', 'oral'];

type Obj = Record<string, unknown>;
const isObj = (v: unknown): v is Obj => v != null && typeof v === 'object' && !Array.isArray(v);
const isPosNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0;
const isStr = (v: unknown): v is string => typeof v === 'string' && v.trim() !== '';

/**
 * Validate an admin-supplied drug-model library entry without zod: returns every field-level problem
 * (never throws). Checks structure, required parameters for the structure and routes, positive finite
 * numbers, provenance (`source` text and `fromMemory` flag on every number), covariate ranges, that each
 * expression passes the restricted mathjs allow-list and uses only declared covariates and THETA, and that
 * each expression gives a finite positive value at the low and high ends of the declared covariate ranges.
 * @example validateDrugModel(vancomycinGoti2018) // => { ok: true, problems: [] }
 */
export function validateDrugModel(entry: unknown): EntryValidation {
  const problems: EntryProblem[] = [];
  const add = (field: string, message: string): void => {
    problems.push({ field, message });
  };
  if (!isObj(entry))
    return { ok: false, problems: [{ field: '', message: 'entry must be an object' }] };
  for (const f of ['id', 'drug', 'title', 'population']) {
    if (!isStr(entry[f])) add(f, 'must be a non-empty string');
  }
  const provenance = (o: Obj, field: string): void => {
    if (!isStr(o.source))
      add(`${field}.source`, 'must name the published source (or "common practice")');
    if (typeof o.fromMemory !== 'boolean') add(`${field}.fromMemory`, 'must be true or false');
  };

  const structure = entry.structure;
  let mm = false;
  let compartments = 1;
  if (!isObj(structure)) add('structure', 'must be an object');
  else {
    if (structure.compartments !== 1 && structure.compartments !== 2)
      add('structure.compartments', 'must be 1 or 2');
    else compartments = structure.compartments;
    if (structure.elimination !== 'linear' && structure.elimination !== 'michaelis-menten') {
      add('structure.elimination', 'must be "linear" or "michaelis-menten"');
    } else mm = structure.elimination === 'michaelis-menten';
  }
  const routes = entry.routes;
  let oral = false;
  if (!Array.isArray(routes) || routes.length === 0) add('routes', 'must be a non-empty array');
  else
    routes.forEach((r, i) => {
      if (!ROUTES.includes(r as string))
        add(`routes[${i}]`, 'must be "bolus", "infusion" or "oral"');
      if (r === 'oral') oral = true;
    });

  // Covariates first: expressions may use only these.
  const declared = new Map<string, { min: number; max: number }>();
  const covs = entry.covariates;
  if (!Array.isArray(covs)) add('covariates', 'must be an array');
  else
    covs.forEach((c, i) => {
      const f = `covariates[${i}]`;
      if (!isObj(c)) return add(f, 'must be an object');
      if (!isStr(c.name) || !/^[A-Z][A-Z0-9_]*$/.test(c.name))
        add(`${f}.name`, 'must be an upper-case symbol, e.g. CRCL');
      else if (c.name === 'THETA') add(`${f}.name`, 'THETA is reserved for the typical value');
      if (!isStr(c.unit)) add(`${f}.unit`, 'must be a non-empty string');
      if (!isStr(c.description)) add(`${f}.description`, 'must be a non-empty string');
      const okRange =
        typeof c.min === 'number' &&
        typeof c.max === 'number' &&
        Number.isFinite(c.min) &&
        Number.isFinite(c.max) &&
        c.min <= c.max;
      if (!okRange) add(`${f}.min`, 'min and max must be finite numbers with min ≤ max');
      provenance(c, f);
      if (isStr(c.name) && okRange)
        declared.set(c.name, { min: c.min as number, max: c.max as number });
    });

  const params = entry.parameters;
  if (!isObj(params)) add('parameters', 'must be an object');
  else {
    const required: LibraryParameterName[] = mm ? ['V1', 'Vmax', 'Km'] : ['CL', 'V1'];
    if (compartments === 2) required.push('Q', 'V2');
    if (oral) required.push('ka');
    for (const r of required)
      if (params[r] === undefined)
        add(`parameters.${r}`, 'is required for this structure and routes');
    for (const [name, spec] of Object.entries(params)) {
      const f = `parameters.${name}`;
      if (!PARAMETER_NAMES.includes(name as LibraryParameterName)) {
        add(f, `unknown parameter (allowed: ${PARAMETER_NAMES.join(', ')})`);
        continue;
      }
      if (!isObj(spec)) {
        add(f, 'must be an object');
        continue;
      }
      if (!isPosNum(spec.typical) && !(name === 'tlag' && spec.typical === 0))
        add(`${f}.typical`, 'must be a finite number > 0');
      if (name === 'F' && typeof spec.typical === 'number' && spec.typical > 1)
        add(`${f}.typical`, 'F is a fraction ≤ 1');
      if (!isStr(spec.unit)) add(`${f}.unit`, 'must be a non-empty string');
      provenance(spec, f);
      if (spec.expression !== undefined) {
        try {
          const expr = compileCovariateExpression(
            spec.expression as string,
            `${f}.expression`,
            'validateDrugModel',
          );
          const unknown = expr.symbols.filter((s) => s !== 'THETA' && !declared.has(s));
          if (unknown.length > 0)
            add(`${f}.expression`, `uses undeclared covariate(s): ${unknown.join(', ')}`);
          else if (isPosNum(spec.typical)) {
            for (const end of ['min', 'max'] as const) {
              const scope: Record<string, number> = { THETA: spec.typical };
              for (const [k, r] of declared) scope[k] = r[end];
              try {
                const v = expr.evaluate(scope);
                if (!(v > 0))
                  add(`${f}.expression`, `gives ${v} (not > 0) with every covariate at its ${end}`);
              } catch (e) {
                add(`${f}.expression`, (e as Error).message);
              }
            }
          }
        } catch (e) {
          add(`${f}.expression`, (e as Error).message);
        }
      }
    }
  }

  const variability = entry.variability;
  if (!isObj(variability)) add('variability', 'must be an object');
  else
    for (const [name, v] of Object.entries(variability)) {
      const f = `variability.${name}`;
      if (!isObj(params) || params[name] === undefined)
        add(f, 'refers to a parameter the model does not define');
      if (!isObj(v)) {
        add(f, 'must be an object');
        continue;
      }
      const hasOmega = v.omega !== undefined;
      const hasCv = v.cvPercent !== undefined;
      if (hasOmega === hasCv) add(f, 'give exactly one of omega or cvPercent');
      if (hasOmega && !isPosNum(v.omega)) add(`${f}.omega`, 'must be a finite number > 0');
      if (hasCv && !isPosNum(v.cvPercent)) add(`${f}.cvPercent`, 'must be a finite number > 0');
      provenance(v, f);
    }

  const re = entry.residualError;
  if (!isObj(re)) add('residualError', 'must be an object');
  else {
    if (re.model !== 'additive' && re.model !== 'proportional' && re.model !== 'combined') {
      add('residualError.model', 'must be "additive", "proportional" or "combined"');
    }
    if ((re.model === 'additive' || re.model === 'combined') && !isPosNum(re.additive)) {
      add('residualError.additive', 'must be a finite number > 0 (mg/L)');
    }
    if ((re.model === 'proportional' || re.model === 'combined') && !isPosNum(re.proportional)) {
      add('residualError.proportional', 'must be a finite fraction > 0 (0.15 = 15 %)');
    }
    provenance(re, 'residualError');
  }

  const pr = entry.practical;
  if (!isObj(pr)) add('practical', 'must be an object');
  else {
    if (!isPosNum(pr.doseRoundingMg))
      add('practical.doseRoundingMg', 'must be a finite number > 0 (mg)');
    if (pr.maxInfusionRateMgPerH !== null && !isPosNum(pr.maxInfusionRateMgPerH)) {
      add('practical.maxInfusionRateMgPerH', 'must be a number > 0 (mg/h) or null');
    }
    if (
      !Array.isArray(pr.usualIntervalsH) ||
      pr.usualIntervalsH.length === 0 ||
      !pr.usualIntervalsH.every(isPosNum)
    ) {
      add('practical.usualIntervalsH', 'must be a non-empty array of intervals > 0 (h)');
    }
    if (
      pr.preferredIntervalsH !== undefined &&
      (!Array.isArray(pr.preferredIntervalsH) ||
        !pr.preferredIntervalsH.every(
          (t: unknown) =>
            isPosNum(t) && Array.isArray(pr.usualIntervalsH) && pr.usualIntervalsH.includes(t),
        ))
    ) {
      add(
        'practical.preferredIntervalsH',
        'must be an array of intervals (h) taken from practical.usualIntervalsH',
      );
    }
    if (pr.oralLoadingPortionMg !== undefined && !isPosNum(pr.oralLoadingPortionMg))
      add('practical.oralLoadingPortionMg', 'must be a finite number > 0 (mg)');
    if (pr.usualMaxSingleDoseMg !== undefined && !isPosNum(pr.usualMaxSingleDoseMg))
      add('practical.usualMaxSingleDoseMg', 'must be a finite number > 0 (mg)');
    if (pr.defaultInfusionH !== undefined && !isPosNum(pr.defaultInfusionH))
      add('practical.defaultInfusionH', 'must be > 0 (h)');
    if (pr.assayUnit !== 'mg/L') add('practical.assayUnit', 'must be "mg/L"');
    if (!isPosNum(pr.siFactor))
      add('practical.siFactor', 'must be a finite number > 0 (µmol/L per mg/L)');
    if (pr.saltFactor !== undefined && (!isPosNum(pr.saltFactor) || pr.saltFactor > 1))
      add('practical.saltFactor', 'must be in (0, 1]');
    if (!Array.isArray(pr.sources) || !pr.sources.every(isStr))
      add('practical.sources', 'must be an array of source strings');
    const t = pr.target;
    if (!isObj(t)) add('practical.target', 'must be an object');
    else {
      if (t.kind === 'auc24' || t.kind === 'concentration') {
        if (!isPosNum(t.low) || !isPosNum(t.high) || (t.low as number) > (t.high as number))
          add('practical.target.low', 'low and high must be > 0 with low ≤ high');
        if (t.kind === 'auc24' && !isPosNum(t.mic))
          add('practical.target.mic', 'must be > 0 (mg/L)');
      } else if (t.kind === 'peak-trough') {
        for (const k of ['peakOverMic', 'mic', 'troughMax'])
          if (!isPosNum(t[k])) add(`practical.target.${k}`, 'must be a finite number > 0');
      } else add('practical.target.kind', 'must be "auc24", "peak-trough" or "concentration"');
      provenance(t, 'practical.target');
    }
  }
  if (
    !Array.isArray(entry.references) ||
    entry.references.length === 0 ||
    !entry.references.every(isStr)
  ) {
    add('references', 'must list at least one reference');
  }
  return { ok: problems.length === 0, problems };
}

/** Type guard form of `validateDrugModel`. */
export function isValidDrugModel(entry: unknown): entry is DrugModelEntry {
  return validateDrugModel(entry).ok;
}
