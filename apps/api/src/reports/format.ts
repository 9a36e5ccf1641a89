/**
 * Number, dose and time formatting for printed output, following the ISMP dose-designation
 * rules: no trailing zeros ("5 mg", never "5.0 mg"), a leading zero before a decimal point
 * ("0.5 mg", never ".5 mg"), thousands separators at or above 1,000, units written out in full
 * where an abbreviation is error-prone, and gram doses echoed in milligrams ("1 g (1,000 mg)").
 * Formatting only: nothing here computes a dose.
 */

/** Rounds to at most `maxDecimals` places and drops trailing zeros; thousands separated. */
export function formatNumber(value: number, maxDecimals = 2): string {
  if (!Number.isFinite(value)) return '–';
  const fixed = Math.abs(value).toFixed(maxDecimals);
  const [intPart = '0', fracPart = ''] = fixed.split('.');
  const frac = fracPart.replace(/0+$/, '');
  const grouped = intPart.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  const sign = value < 0 && Number(fixed) !== 0 ? '−' : '';
  return `${sign}${grouped}${frac ? `.${frac}` : ''}`;
}

/** A dose in mg, echoed in grams at 1,000 mg and above: "750 mg", "1.25 g (1,250 mg)". */
export function formatDoseMg(mg: number): string {
  if (mg >= 1000) return `${formatNumber(mg / 1000, 3)} g (${formatNumber(mg, 0)} mg)`;
  return `${formatNumber(mg, mg < 10 ? 2 : 0)} mg`;
}

/** Hours, e.g. "1.5 h", "12 h". */
export function formatHours(h: number): string {
  return `${formatNumber(h, 2)} h`;
}

/** A concentration in mg/L with one decimal at most: "14.2 mg/L", "8 mg/L". */
export function formatConc(c: number, unit = 'mg/L'): string {
  return `${formatNumber(c, c < 1 ? 2 : 1)} ${unit}`;
}

/** How clock times are printed: real clock time in a zone, or relative days for teaching cases. */
export type TimeBase =
  | { kind: 'clock'; timeZone: string }
  /** Teaching cases: times print as "Day 2 08:00", counted from `origin` (day 1, 00:00). */
  | { kind: 'relative'; origin: string };

function parts(iso: string, timeZone: string) {
  const fmt = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'shortOffset',
  });
  const out: Record<string, string> = {};
  for (const p of fmt.formatToParts(new Date(iso))) out[p.type] = p.value;
  return out;
}

function relative(iso: string, origin: string): { day: number; hhmm: string } {
  const minutes = Math.round((Date.parse(iso) - Date.parse(origin)) / 60_000);
  const day = Math.floor(minutes / 1440) + 1;
  const m = ((minutes % 1440) + 1440) % 1440;
  const hhmm = `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
  return { day, hhmm };
}

/** "3 Dec 2026 08:00" (clock) or "Day 3 08:00" (relative). */
export function formatDateTime(iso: string, base: TimeBase, withZone = false): string {
  if (base.kind === 'relative') {
    const r = relative(iso, base.origin);
    return `Day ${r.day} ${r.hhmm}`;
  }
  const p = parts(iso, base.timeZone);
  const zone = withZone && p.timeZoneName ? ` ${p.timeZoneName.replace('GMT', 'UTC')}` : '';
  return `${p.day} ${p.month} ${p.year} ${p.hour}:${p.minute}${zone}`;
}

/** "08:00" */
export function formatClock(iso: string, base: TimeBase): string {
  if (base.kind === 'relative') return relative(iso, base.origin).hhmm;
  const p = parts(iso, base.timeZone);
  return `${p.hour}:${p.minute}`;
}

/** "3 Dec" (clock) or "day 3" (relative). */
export function formatDay(iso: string, base: TimeBase): string {
  if (base.kind === 'relative') return `day ${relative(iso, base.origin).day}`;
  const p = parts(iso, base.timeZone);
  return `${p.day} ${p.month}`;
}

/** The zone label printed once in headings, e.g. "times in Australia/Brisbane (UTC+10)". */
export function describeTimeBase(base: TimeBase, atIso: string): string {
  if (base.kind === 'relative') return 'times relative to the first day of the case';
  const p = parts(atIso, base.timeZone);
  return `times in ${base.timeZone} (${(p.timeZoneName ?? '').replace('GMT', 'UTC')})`;
}
