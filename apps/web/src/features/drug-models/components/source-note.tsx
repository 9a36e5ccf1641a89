import type { Provenance } from '@ebbtide/kinetics';

/** The visible marker on a number recalled from memory rather than read in its source. */
export function FromMemory() {
  return (
    <span
      className="ml-1 inline-block rounded border border-amber-400 bg-amber-50 px-1 text-[11px] font-semibold whitespace-nowrap text-amber-900"
      title="This value was recalled, not read in the source"
    >
      from memory — verify before clinical use
    </span>
  );
}

/** Where a number came from, with the marker when the data flags it. */
export function SourceNote({ p }: { p: Provenance | undefined }) {
  if (!p) return <span className="text-slate-500">—</span>;
  return (
    <span className="text-xs text-slate-700">
      {p.source}
      {p.fromMemory && <FromMemory />}
    </span>
  );
}
