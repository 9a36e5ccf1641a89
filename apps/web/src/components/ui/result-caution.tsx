import { CLINICAL_CAUTION } from '../layout/clinical-caution';

/** The compact caution beside every result panel (the shell carries the full banner). */
export function ResultCaution({ text }: { text?: string | undefined }) {
  return (
    <p
      role="note"
      aria-label="Result caution"
      className="mt-2 border-l-4 border-amber-400 bg-amber-50 px-2 py-1 text-xs text-amber-900"
    >
      <strong className="font-semibold">Check before use.</strong> {text ?? CLINICAL_CAUTION}
    </p>
  );
}
