import { format } from 'date-fns';
import { enAU, enCA, enGB, enIE, enNZ, enUS, type Locale } from 'date-fns/locale';

/**
 * Formatting of clinical numbers and times for display. Rules (ISMP dose designations, common
 * practice): never a trailing zero ("1 g", not "1.0 g"), never a naked decimal ("0.5", not ".5"),
 * always a unit, and amounts echoed in both units ("1.5 g (1500 mg)").
 */

/** A number with at most `maxDecimals` decimals and no trailing zeros; uses a leading zero. */
export function formatNumber(value: number, maxDecimals = 2): string {
  if (!Number.isFinite(value)) return '—';
  const factor = 10 ** maxDecimals;
  const rounded = Math.round(value * factor) / factor;
  // Avoid "-0".
  const clean = Object.is(rounded, -0) ? 0 : rounded;
  return clean.toLocaleString('en-GB', {
    maximumFractionDigits: maxDecimals,
    minimumFractionDigits: 0,
    useGrouping: false,
  });
}

/** A dose in both units: "1.5 g (1500 mg)" from 1 g up, "750 mg (0.75 g)" below. */
export function echoDoseMg(mg: number): string {
  if (mg >= 1000) return `${formatNumber(mg / 1000, 3)} g (${formatNumber(mg, 1)} mg)`;
  return `${formatNumber(mg, 1)} mg (${formatNumber(mg / 1000, 4)} g)`;
}

/** An amount as entered with its unit, echoed in both: "1 g (1000 mg)". */
export function echoAmount(amount: number, unit: 'mg' | 'g'): string {
  return echoDoseMg(unit === 'g' ? amount * 1000 : amount);
}

/** A duration: "1.5 h", "45 min (0.75 h)" below one hour, "bolus" for 0. */
export function echoHours(h: number): string {
  if (h <= 0) return 'bolus';
  if (h < 1) return `${formatNumber(h * 60, 0)} min (${formatNumber(h, 2)} h)`;
  return `${formatNumber(h, 2)} h`;
}

/** "1.5 g (1500 mg) over 1.5 h every 12 h" — a regimen as a nurse would read it. */
export function echoRegimen(r: {
  doseMg: number;
  infusionH: number;
  intervalH: number;
  route?: 'iv-infusion' | 'iv-bolus' | 'oral' | 'im';
}): string {
  const over =
    r.route === 'oral'
      ? ' by mouth'
      : r.route === 'im'
        ? ' intramuscularly'
        : r.infusionH > 0
          ? ` over ${echoHours(r.infusionH)}`
          : ' as a bolus';
  return `${echoDoseMg(r.doseMg)}${over} every ${formatNumber(r.intervalH, 2)} h`;
}

/** mg/L with at most one decimal (two below 1 mg/L). */
export function formatConcentration(mgL: number | null | undefined): string {
  if (mgL === null || mgL === undefined) return '—';
  return `${formatNumber(mgL, mgL < 1 ? 2 : 1)} mg/L`;
}

export function formatAuc(auc: number | null | undefined): string {
  if (auc === null || auc === undefined) return '—';
  return `${formatNumber(auc, 0)} mg·h/L`;
}

/**
 * A teaching-case time, relative to the first dose: hour 0 is "day 1 00:00", hour 32 is
 * "day 2 08:00", hour -4 is "day 0 20:00". Teaching cases carry no real dates (HIPAA Safe Harbor).
 */
export function formatRelativeHour(hour: number): string {
  const totalMinutes = Math.round(hour * 60);
  const dayIndex = Math.floor(totalMinutes / (24 * 60));
  const minuteOfDay = totalMinutes - dayIndex * 24 * 60;
  const hh = String(Math.floor(minuteOfDay / 60)).padStart(2, '0');
  const mm = String(minuteOfDay % 60).padStart(2, '0');
  return `day ${dayIndex + 1} ${hh}:${mm}`;
}

const locales: Record<string, Locale> = {
  'en-US': enUS,
  'en-GB': enGB,
  'en-AU': enAU,
  'en-NZ': enNZ,
  'en-CA': enCA,
  'en-IE': enIE,
};

/** The date-fns locale nearest the browser's language (British English when unknown). */
export function userLocale(language: string | undefined = globalThis.navigator?.language): Locale {
  if (!language) return enGB;
  return locales[language] ?? (language.startsWith('en-US') ? enUS : enGB);
}

/** A real date-time in the user's locale, e.g. "01/12/2026, 08:00". */
export function formatDateTime(iso: string, locale: Locale = userLocale()): string {
  return format(new Date(iso), 'P, HH:mm', { locale });
}

/** A clinical time: relative for teaching cases, a locale date-time for real patients. */
export function formatClinicalTime(t: { at: string | null; hour: number | null }): string {
  if (t.hour !== null) return formatRelativeHour(t.hour);
  if (t.at) return formatDateTime(t.at);
  return '—';
}

/** Hours of the course timeline: relative hour (teaching) or hours after the reference time (real). */
export function hoursFrom(
  referenceAt: string | null,
  t: { at: string | null; hour: number | null },
) {
  if (t.hour !== null) return t.hour;
  if (t.at && referenceAt) return (Date.parse(t.at) - Date.parse(referenceAt)) / 3_600_000;
  return 0;
}

/** A value for <input type="datetime-local"> from an ISO date-time, in local time. */
export function toLocalInput(iso: string | null | undefined): string {
  if (!iso) return '';
  return format(new Date(iso), "yyyy-MM-dd'T'HH:mm");
}

/** ISO date-time with offset from a datetime-local value (read in the browser's time zone). */
export function fromLocalInput(value: string): string | undefined {
  if (!value) return undefined;
  const d = new Date(value);
  return Number.isNaN(d.getTime()) ? undefined : d.toISOString();
}
