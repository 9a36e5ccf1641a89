/** Same wording as the client's clinical-caution component; every dosing result carries it. */
export const CLINICAL_CAUTION =
  'Ebbtide supports, and does not replace, clinical judgement. Every result must be checked by a ' +
  'qualified pharmacist against the patient, local protocols and licensed practice, which take precedence.';
