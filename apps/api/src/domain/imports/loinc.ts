import type { CovariateKind, Drug, SampleKind } from '@ebbtide/contracts';

/**
 * LOINC codes we map. Sources (pk-reference F1): "a-L" seen in a LOINC table extract, "a-c" seen only in
 * public code or mapping files. Some public files mislabel codes: every code must be validated against
 * the official LOINC release before shipping. Codes marked unverified there (4091-5, 3664-0, 4058-4,
 * amikacin peak/trough) are deliberately NOT mapped, so they are reported as unknown.
 */
export type LoincTarget =
  | {
      target: 'level';
      drug: Drug;
      sampleKind: SampleKind;
      fraction: 'total' | 'free';
      provenance: string;
    }
  | { target: 'covariate'; kind: Exclude<CovariateKind, 'dialysis'>; provenance: string };

export const LOINC_MAP: Readonly<Record<string, LoincTarget>> = Object.freeze({
  '20578-1': {
    target: 'level',
    drug: 'vancomycin',
    sampleKind: 'random',
    fraction: 'total',
    provenance: 'a-c',
  },
  '4092-3': {
    target: 'level',
    drug: 'vancomycin',
    sampleKind: 'trough',
    fraction: 'total',
    provenance: 'a-L',
  },
  '4090-7': {
    target: 'level',
    drug: 'vancomycin',
    sampleKind: 'peak',
    fraction: 'total',
    provenance: 'a-L',
  },
  '35668-3': {
    target: 'level',
    drug: 'gentamicin',
    sampleKind: 'random',
    fraction: 'total',
    provenance: 'a-c',
  },
  '3663-2': {
    target: 'level',
    drug: 'gentamicin',
    sampleKind: 'peak',
    fraction: 'total',
    provenance: 'a-L',
  },
  '3665-7': {
    target: 'level',
    drug: 'gentamicin',
    sampleKind: 'trough',
    fraction: 'total',
    provenance: 'a-c',
  },
  '35670-9': {
    target: 'level',
    drug: 'tobramycin',
    sampleKind: 'random',
    fraction: 'total',
    provenance: 'a-c',
  },
  '4057-6': {
    target: 'level',
    drug: 'tobramycin',
    sampleKind: 'peak',
    fraction: 'total',
    provenance: 'a-L',
  },
  '4059-2': {
    target: 'level',
    drug: 'tobramycin',
    sampleKind: 'trough',
    fraction: 'total',
    provenance: 'a-c',
  },
  '35669-1': {
    target: 'level',
    drug: 'amikacin',
    sampleKind: 'random',
    fraction: 'total',
    provenance: 'a-c',
  },
  '3968-5': {
    target: 'level',
    drug: 'phenytoin',
    sampleKind: 'random',
    fraction: 'total',
    provenance: 'a-c',
  },
  '3969-3': {
    target: 'level',
    drug: 'phenytoin',
    sampleKind: 'random',
    fraction: 'free',
    provenance: 'a-c',
  },
  '2160-0': { target: 'covariate', kind: 'serum-creatinine', provenance: 'a (FHIR value set)' },
  '14682-9': { target: 'covariate', kind: 'serum-creatinine', provenance: 'a (FHIR value set)' },
  '29463-7': { target: 'covariate', kind: 'weight', provenance: 'a-c' },
  '8302-2': { target: 'covariate', kind: 'height', provenance: 'a-c' },
  // 1751-7 is recalled (b), not seen in a source: check before shipping.
  '1751-7': { target: 'covariate', kind: 'albumin', provenance: 'b (unverified)' },
});

export const LOINC_SYSTEM = 'http://loinc.org';
export const UCUM_SYSTEM = 'http://unitsofmeasure.org';

/** RxNorm ingredient codes seen in one FHIR app (a-c): vancomycin 11124; gentamicin 1596450 is product-level. */
export const RXNORM_DRUGS: Readonly<Record<string, Drug>> = Object.freeze({
  '11124': 'vancomycin',
  '1596450': 'gentamicin',
});
