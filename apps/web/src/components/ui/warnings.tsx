/** Engine and server warnings: shown, never hidden (nothing is silently extrapolated). */
export function Warnings({
  warnings,
  label = 'Warnings',
}: {
  warnings: { code: string; message: string }[];
  label?: string;
}) {
  if (warnings.length === 0) return null;
  return (
    <div
      role="region"
      aria-label={label}
      className="mt-2 rounded border border-orange-300 bg-orange-50 px-3 py-2 text-sm text-orange-900"
    >
      <p className="text-xs font-semibold uppercase tracking-wide">{label}</p>
      <ul className="mt-1 list-disc pl-5">
        {warnings.map((w, i) => (
          <li key={`${w.code}-${i}`} data-code={w.code}>
            {w.message}
          </li>
        ))}
      </ul>
    </div>
  );
}
