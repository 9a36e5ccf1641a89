import type {
  DrugModelEntry,
  ParameterSpec,
  Provenance,
  TargetSpec,
  VariabilitySpec,
} from '@ebbtide/kinetics';

/**
 * The stored `definition` is the engine's model entry, checked by the engine's validator before
 * the server stores it. Read it defensively anyway: an older row may lack a part.
 */
export type ModelDefinition = Partial<DrugModelEntry>;

export const asDefinition = (definition: Record<string, unknown>): ModelDefinition =>
  definition as ModelDefinition;

export function structureLabel(d: ModelDefinition): string {
  const s = d.structure;
  if (!s) return '—';
  return `${s.compartments}-compartment`;
}

export function eliminationLabel(d: ModelDefinition): string {
  const e = d.structure?.elimination;
  if (!e) return '—';
  return e === 'michaelis-menten' ? 'Michaelis-Menten' : 'linear';
}

export const PARAMETER_NAMES: Record<string, string> = {
  CL: 'Clearance CL',
  V1: 'Central volume V1',
  Q: 'Intercompartmental clearance Q',
  V2: 'Peripheral volume V2',
  ka: 'Absorption rate ka',
  F: 'Bioavailability F',
  tlag: 'Lag time tlag',
  Vmax: 'Maximum elimination rate Vmax',
  Km: 'Michaelis constant Km',
};

/** The usual reading order (stored JSON does not keep key order). */
const ORDER = Object.keys(PARAMETER_NAMES);
const byUsualOrder = ([a]: [string, unknown], [b]: [string, unknown]) =>
  (ORDER.includes(a) ? ORDER.indexOf(a) : ORDER.length) -
  (ORDER.includes(b) ? ORDER.indexOf(b) : ORDER.length);

export const parameterEntries = (d: ModelDefinition): Array<[string, ParameterSpec]> =>
  Object.entries(d.parameters ?? {})
    .filter((e): e is [string, ParameterSpec] => !!e[1])
    .sort(byUsualOrder);

export const variabilityEntries = (d: ModelDefinition): Array<[string, VariabilitySpec]> =>
  Object.entries(d.variability ?? {})
    .filter((e): e is [string, VariabilitySpec] => !!e[1])
    .sort(byUsualOrder);

/** A covariate's range as it reads: "5–150 mL/min", or "0 or 1" for a yes/no flag. */
export const rangeLabel = (c: { min: number; max: number; unit: string }): string =>
  c.unit === '0/1' ? '0 (no) or 1 (yes)' : `${c.min}–${c.max} ${c.unit}`;

/**
 * Log-normal between-subject variability: ω (SD of ln θ) and CV% describe the same spread,
 * CV = √(exp(ω²) − 1) and ω = √ln(1 + CV²). Source: the log-normal distribution's moments
 * (common practice). `derived` says which of the two was computed rather than given.
 */
export function omegaAndCv(v: VariabilitySpec): {
  omega: number | null;
  cvPercent: number | null;
  derived: 'omega' | 'cv' | null;
} {
  if (typeof v.omega === 'number')
    return {
      omega: v.omega,
      cvPercent:
        typeof v.cvPercent === 'number'
          ? v.cvPercent
          : Math.sqrt(Math.exp(v.omega * v.omega) - 1) * 100,
      derived: typeof v.cvPercent === 'number' ? null : 'cv',
    };
  if (typeof v.cvPercent === 'number') {
    const cv = v.cvPercent / 100;
    return { omega: Math.sqrt(Math.log(1 + cv * cv)), cvPercent: v.cvPercent, derived: 'omega' };
  }
  return { omega: null, cvPercent: null, derived: null };
}

export function targetLabel(t: TargetSpec | undefined): string {
  if (!t) return '—';
  if (t.kind === 'auc24') return `AUC24 ${t.low}–${t.high} mg·h/L at MIC ${t.mic} mg/L`;
  if (t.kind === 'peak-trough')
    return `Peak/MIC ≥ ${t.peakOverMic} at MIC ${t.mic} mg/L, trough ≤ ${t.troughMax} mg/L`;
  return `Concentration ${t.low}–${t.high} mg/L`;
}

/** True when any number of the model was recalled from memory rather than read in its source. */
export function anyFromMemory(d: ModelDefinition): boolean {
  const all: Array<Provenance | undefined> = [
    ...Object.values(d.parameters ?? {}),
    ...Object.values(d.variability ?? {}),
    d.residualError,
    ...(d.covariates ?? []),
    d.practical?.target,
  ];
  return all.some((p) => p?.fromMemory === true);
}
