/**
 * Notes the server sends beside its warnings that state the basis of a result rather than a
 * problem with it (e.g. which creatinine clearance and weight the model used). They are shown,
 * but as a plain line, so a real warning is never lost among them.
 */
const BASIS_CODES = new Set(['crcl-used']);

/** Engine and server warnings: shown, never hidden (nothing is silently extrapolated). */
export function Warnings({
  warnings,
  label = 'Warnings',
}: {
  warnings: { code: string; message: string }[];
  label?: string;
}) {
  const basis = warnings.filter((w) => BASIS_CODES.has(w.code));
  const problems = warnings.filter((w) => !BASIS_CODES.has(w.code));
  if (warnings.length === 0) return null;
  return (
    <>
      {problems.length > 0 && (
        <div
          role="region"
          aria-label={label}
          className="mt-2 rounded border border-orange-300 bg-orange-50 px-3 py-2 text-sm text-orange-900"
        >
          <p className="text-xs font-semibold uppercase tracking-wide">{label}</p>
          <ul className="mt-1 list-disc pl-5">
            {problems.map((w, i) => (
              <li key={`${w.code}-${i}`} data-code={w.code}>
                {w.message}
              </li>
            ))}
          </ul>
        </div>
      )}
      {basis.map((w, i) => (
        <p key={`${w.code}-${i}`} data-code={w.code} className="mt-2 text-xs text-slate-600">
          <span className="font-semibold">Basis:</span> {w.message}
        </p>
      ))}
    </>
  );
}
