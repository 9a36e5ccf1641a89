/**
 * Everything the PDF plan report shows, as plain data. The plan lifecycle maps stored data
 * (patient, course, doses, levels, the server-side fit and regimen search, signatures) into this
 * shape; `renderPlanReport` only lays it out. The renderer never computes a dose, a level or a
 * fit: every number here is printed as given (formatted per ISMP rules, see ./format).
 *
 * Conventions:
 * - Times are ISO 8601 strings with an offset or `Z` (`IsoDateTime`); they print in `timeBase`.
 * - Engine units: amounts in mg, concentrations in mg/L, time in h, AUC in mg·h/L, CL in L/h, V in L.
 * - Optional fields may be omitted or null; the report then prints "not recorded" or leaves the
 *   section out (sections with no rows print a one-line "none" note, never a blank).
 */
import type { TimeBase } from './format';

/** ISO 8601 date-time with offset, e.g. "2026-12-03T08:00:00+10:00". */
export type IsoDateTime = string;

export type PlanStatus = 'draft' | 'submitted' | 'countersigned' | 'returned' | 'superseded';

/** 21 CFR 11.50 meaning of a signature, as printed. */
export type SignatureMeaning = 'authored' | 'reviewed – agree' | 'reviewed – amended' | 'returned';

export interface PlanReportModel {
  /** Printed at the top of every page, e.g. "Kestrel Bay Regional Hospital". */
  hospitalName: string;
  /**
   * How times print: `{ kind: 'clock', timeZone: 'Australia/Brisbane' }` (HOSPITAL_TIME_ZONE) for
   * patients; `{ kind: 'relative', origin }` for teaching cases ("Day 2 08:00").
   */
  timeBase: TimeBase;
  /** When the PDF was generated; printed in every footer. */
  generatedAt: IsoDateTime;
  /** Who exported it (printed name), optional. */
  generatedBy?: string | null;

  plan: {
    id: string;
    version: number;
    status: PlanStatus;
    /** When the plan should be looked at again (next review), if set. */
    recheckDueAt?: IsoDateTime | null;
    /** SHA-256 (hex) of the plan content that was signed; printed with the signatures. */
    contentHash: string;
  };

  patient: {
    /** `teaching-case` prints "Teaching case" in place of a name and hides MRN and birth date. */
    kind: 'patient' | 'teaching-case';
    /** Full name as the hospital displays it ("THORNBURY, Jarrah"); ignored for teaching cases. */
    displayName: string | null;
    mrn: string | null;
    sex: 'female' | 'male' | 'other' | 'unknown';
    /** Age as printed, e.g. "67 years" (the mapper decides; ages over 89 as "90+" for cases). */
    age: string | null;
    /** YYYY-MM-DD, patients only. */
    dateOfBirth?: string | null;
    ward: string | null;
  };

  course: {
    /** e.g. "Vancomycin" */
    drug: string;
    indication: string | null;
    /** MIC and how it was measured; null when not known. */
    mic: { value: number; unit: string; method: string | null } | null;
    /** e.g. { metric: 'AUC24', low: 400, high: 600, unit: 'mg·h/L' } */
    target: {
      metric: string;
      low: number | null;
      high: number | null;
      unit: string;
      note?: string | null;
    };
    /** The population model used, with its published source. */
    model: { name: string; version: string; source: string; population?: string | null };
    startedAt?: IsoDateTime | null;
  };

  /** Covariates as recorded, latest first or in the order to print. */
  covariates: Array<{
    /** e.g. "Weight", "Serum creatinine" */
    name: string;
    value: number | string;
    unit: string | null;
    observedAt: IsoDateTime | null;
    /** e.g. "measured", "stated", "estimated", "laboratory" */
    source: string | null;
    /** The value the engine used when it differs from `unit` (e.g. "1.08 mg/dL"). */
    converted?: string | null;
  }>;

  /** Values derived from covariates, each with the formula printed beside it. */
  derived: Array<{
    /** e.g. "Creatinine clearance" */
    name: string;
    value: number;
    unit: string;
    /** The formula in words/symbols, e.g. "Cockcroft-Gault: (140 − age) × weight × 0.85 ÷ (0.815 × SCr)". */
    formula: string;
    /** Which inputs went in, e.g. "adjusted body weight 81.6 kg, SCr 96 µmol/L (2 Dec 06:10)". */
    inputs?: string | null;
  }>;

  /** Doses given (and planned, if recorded), oldest first. */
  doses: Array<{
    startAt: IsoDateTime;
    amountMg: number;
    /** e.g. "IV infusion", "IV bolus", "oral" */
    route: string;
    /** Infusion duration in h; null for a bolus or oral dose. */
    durationH: number | null;
    status: 'given' | 'planned' | 'missed' | 'held' | 'partial';
    note?: string | null;
  }>;

  /** Measured levels, oldest first, with the level-validity verdict. */
  levels: Array<{
    sampledAt: IsoDateTime;
    value: number;
    unit: string;
    /** True when reported below the limit of quantification (value is the limit). */
    belowLimit?: boolean;
    /** e.g. "usable", "Bayesian only", "discard?"; `reason` says why. */
    verdict: string;
    reason?: string | null;
    /** Whether the fit used it. */
    usedInFit: boolean;
  }>;

  /** The fit; null when the plan rests on population values only. */
  fit: {
    /** e.g. "Bayesian MAP (population prior + 2 levels)" */
    method: string;
    estimates: Array<{
      /** e.g. "Clearance (CL)" */
      name: string;
      value: number;
      unit: string;
      /** 90% interval; null when not available. */
      lower90: number | null;
      upper90: number | null;
      /** Population (typical) value for comparison. */
      population?: number | null;
    }>;
    /** Objective function value at the estimate (−2 log posterior), if reported. */
    objective: number | null;
    /** η-shrinkage per parameter, in percent. */
    shrinkage: Array<{ name: string; percent: number }>;
    note?: string | null;
    /** The plot, all in h (x, since `plot.originAt`) and mg/L (y). */
    plot: PlanReportPlot;
  } | null;

  /** Candidate regimens the pharmacist compared; exactly one should be `chosen`. */
  regimens: Array<{
    doseMg: number;
    intervalH: number;
    infusionH: number;
    /** How it is given; absent = IV infusion (older report models). */
    route?: 'iv-infusion' | 'iv-bolus' | 'oral' | 'im';
    loadingDoseMg?: number | null;
    /** Oral loading dose given in this many portions (phenytoin); absent or 1 = one dose. */
    loadingPortions?: number | null;
    /** Predicted at steady state unless the note says otherwise, mg/L. */
    peak: number;
    trough: number;
    /** mg·h/L */
    auc24: number;
    targetMet: boolean;
    chosen: boolean;
    note?: string | null;
  }>;

  /** Clock times of the doses to give under the chosen regimen, in order. */
  administration: Array<{
    at: IsoDateTime;
    doseMg: number;
    infusionH: number | null;
    /** e.g. "loading dose", "in 250 mL sodium chloride 0.9%" */
    note?: string | null;
  }>;

  /** When to draw the next levels, each tied to a named dose. */
  sampling: Array<{
    drawAt: IsoDateTime;
    /** e.g. "trough", "peak", "random" */
    kind: string;
    /** The dose this draw is timed against. */
    anchor: {
      doseStartAt: IsoDateTime;
      /** Whether the offset counts from the start or the END of that dose's infusion. */
      edge: 'start' | 'end';
      /** Minutes after (positive) or before (negative) that edge. */
      offsetMinutes: number;
    };
    /** Extra instruction, e.g. "peripheral stick, not the infusion lumen". */
    instruction?: string | null;
  }>;

  /** Cautions to print prominently (outside the model's range, single level, …). */
  warnings: Array<{ severity: 'warning' | 'caution'; text: string }>;

  /** The pharmacist's rationale note, free text (may contain line breaks). */
  rationale: string | null;
  /** What to do if renal function changes, etc.; free text. */
  contingency?: string | null;

  /** Signatures in the order given, each per 21 CFR 11.50 (printed name, time, meaning). */
  signatures: Array<{
    name: string;
    /** e.g. "Clinical pharmacist", "Reviewing pharmacist" */
    role: string;
    meaning: SignatureMeaning;
    signedAt: IsoDateTime;
    /** Hash of the content this signature applies to (SHA-256 hex). */
    contentHash: string;
    /** Return or review comment. */
    comment?: string | null;
  }>;
}

/** The fit plot's series. x in hours since `originAt`, y in mg/L. */
export interface PlanReportPlot {
  /** The instant x = 0 stands for (usually the first dose). */
  originAt: IsoDateTime;
  observed: Array<{ t: number; c: number; usedInFit: boolean }>;
  individual: Array<{ t: number; c: number }>;
  population: Array<{ t: number; c: number }>;
  /** The uncertainty band of the individual prediction (e.g. 90%). */
  band: Array<{ t: number; lower: number; upper: number }>;
  /** Label of the band in the legend, e.g. "90% prediction interval". */
  bandLabel: string;
  /** Dose start times (h), drawn as marks on the time axis. */
  doseTimes: number[];
}
