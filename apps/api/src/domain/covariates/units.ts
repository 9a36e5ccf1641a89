import type { CovariateKind } from '@ebbtide/contracts';
import { fmt } from '../patients/common';

/**
 * Unit conversion and plausibility for covariates. Canonical units: kg, cm, umol/L, g/L.
 * Creatinine: 1 mg/dL = 88.4 umol/L (molar mass 113.12 g/mol; 88.4 is the factor in clinical use).
 * Pound: 1 [lb_av] = 0.45359237 kg (exact, by definition).
 */
export const CREATININE_UMOL_PER_MG_DL = 88.4;
export const KG_PER_LB = 0.45359237;

/** Human display of a UCUM code. */
export function showUnit(ucum: string): string {
  return ucum.replace('umol', 'µmol').replace('ug/', 'µg/').replace('[lb_av]', 'lb');
}

export interface CovariateCheck {
  canonicalValue: number | null;
  echo: string;
  /** Field-level refusals; empty when plausible. */
  errors: Record<string, string[]>;
}

/**
 * Converts to the canonical unit and refuses implausible values with a hint when the value looks
 * like another unit (metres or inches for a height, mg/dL labelled umol/L, g/dL labelled g/L).
 */
export function checkCovariate(
  kind: Exclude<CovariateKind, 'dialysis'>,
  value: number,
  unit: string,
  patientAgeYears: number,
): CovariateCheck {
  const errors: Record<string, string[]> = {};
  const refuse = (field: string, message: string) => (errors[field] ??= []).push(message);
  const v = value;
  let canonical: number | null = null;
  let canonicalUnit = '';
  switch (kind) {
    case 'weight': {
      canonicalUnit = 'kg';
      if (unit === 'kg') canonical = v;
      else if (unit === '[lb_av]') canonical = v * KG_PER_LB;
      else refuse('unit', `unknown weight unit "${unit}": use kg or [lb_av]`);
      if (canonical !== null && (canonical < 0.3 || canonical > 350)) {
        const asPounds = v * KG_PER_LB;
        const hint =
          unit === 'kg' && v > 350 && v / 1000 >= 0.3
            ? ` If this was grams, ${fmt(v)} g = ${fmt(v / 1000)} kg.`
            : unit === 'kg' && v > 350 && asPounds <= 350
              ? ` If this was pounds, ${fmt(v)} lb = ${fmt(asPounds)} kg.`
              : '';
        refuse(
          'value',
          `weight ${fmt(canonical)} kg is outside the plausible range 0.3–350 kg.${hint}`,
        );
      }
      break;
    }
    case 'height': {
      canonicalUnit = 'cm';
      if (unit !== 'cm') {
        refuse('unit', `unknown height unit "${unit}": enter the height in cm`);
        break;
      }
      canonical = v;
      if (v >= 0.25 && v <= 2.5) {
        refuse(
          'value',
          `${fmt(v)} cm looks like metres: ${fmt(v)} m = ${fmt(v * 100)} cm. Enter the height in cm.`,
        );
      } else if (patientAgeYears >= 16 && v >= 48 && v <= 90) {
        refuse(
          'value',
          `${fmt(v)} cm is implausibly short for a ${patientAgeYears}-year-old and looks like inches: ${fmt(v)} in = ${fmt(v * 2.54)} cm. Enter the height in cm.`,
        );
      } else if (v < 25 || v > 250) {
        refuse('value', `height ${fmt(v)} cm is outside the plausible range 25–250 cm`);
      }
      break;
    }
    case 'serum-creatinine': {
      canonicalUnit = 'umol/L';
      if (unit === 'umol/L') {
        canonical = v;
        if (v < 15 && v >= 0.1 && v * CREATININE_UMOL_PER_MG_DL <= 2000) {
          refuse(
            'value',
            `serum creatinine ${fmt(v)} µmol/L is implausibly low and is almost certainly mg/dL: ${fmt(v)} mg/dL = ${fmt(v * CREATININE_UMOL_PER_MG_DL)} µmol/L. Check the unit.`,
          );
        } else if (v < 15 || v > 2000) {
          refuse(
            'value',
            `serum creatinine ${fmt(v)} µmol/L is outside the plausible range 15–2000 µmol/L`,
          );
        }
      } else if (unit === 'mg/dL') {
        canonical = v * CREATININE_UMOL_PER_MG_DL;
        if (v > 25 && v / CREATININE_UMOL_PER_MG_DL >= 0.15) {
          refuse(
            'value',
            `serum creatinine ${fmt(v)} mg/dL is implausibly high and is almost certainly µmol/L: ${fmt(v)} µmol/L = ${fmt(v / CREATININE_UMOL_PER_MG_DL, 3)} mg/dL. Check the unit.`,
          );
        } else if (v < 0.15 || v > 25) {
          refuse(
            'value',
            `serum creatinine ${fmt(v)} mg/dL is outside the plausible range 0.15–25 mg/dL`,
          );
        }
      } else refuse('unit', `unknown creatinine unit "${unit}": use umol/L or mg/dL`);
      break;
    }
    case 'albumin': {
      canonicalUnit = 'g/L';
      if (unit === 'g/L') {
        canonical = v;
        if (v >= 0.5 && v < 7) {
          refuse(
            'value',
            `albumin ${fmt(v)} g/L looks like g/dL: ${fmt(v)} g/dL = ${fmt(v * 10)} g/L. Check the unit.`,
          );
        } else if (v < 5 || v > 70)
          refuse('value', `albumin ${fmt(v)} g/L is outside the plausible range 5–70 g/L`);
      } else if (unit === 'g/dL') {
        canonical = v * 10;
        if (v > 7 && v <= 70) {
          refuse(
            'value',
            `albumin ${fmt(v)} g/dL looks like g/L: ${fmt(v)} g/L = ${fmt(v / 10)} g/dL. Check the unit.`,
          );
        } else if (v < 0.5 || v > 7)
          refuse('value', `albumin ${fmt(v)} g/dL is outside the plausible range 0.5–7 g/dL`);
      } else refuse('unit', `unknown albumin unit "${unit}": use g/L or g/dL`);
      break;
    }
  }
  const echo =
    canonical === null
      ? `${fmt(v)} ${showUnit(unit)}`
      : unit === canonicalUnit
        ? kind === 'serum-creatinine'
          ? `${fmt(v)} µmol/L (${fmt(v / CREATININE_UMOL_PER_MG_DL, 3)} mg/dL)`
          : kind === 'albumin'
            ? `${fmt(v)} g/L (${fmt(v / 10)} g/dL)`
            : `${fmt(v)} ${showUnit(unit)}`
        : `${fmt(v)} ${showUnit(unit)} (${fmt(canonical)} ${showUnit(canonicalUnit)})`;
  return { canonicalValue: canonical, echo, errors };
}
