/**
 * The caution every screen that can show a dosing result carries.
 * Keep the wording in one place so the screens and the PDF report agree.
 */
export const CLINICAL_CAUTION =
  'Ebbtide supports, and does not replace, clinical judgement. Every result must be checked by a ' +
  'qualified pharmacist against the patient, local protocols and licensed practice, which take precedence.';

export function ClinicalCaution() {
  return (
    <aside
      role="note"
      aria-label="Clinical caution"
      data-testid="clinical-caution"
      className="border-b border-amber-300 bg-amber-50 px-4 py-2 text-sm text-amber-900"
    >
      <strong className="font-semibold">Decision support only.</strong> {CLINICAL_CAUTION}
    </aside>
  );
}
