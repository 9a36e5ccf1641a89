import type {
  PlannedDraw,
  PlannedRegimen,
  Regimen,
  SampleDrawInput,
  Warning,
} from '@ebbtide/contracts';
import { maintenanceAfterPortions, oralLoadingPortions } from '@ebbtide/kinetics';

const HOUR_MS = 3_600_000;

/** "08:00" in the hospital's zone. */
export function clockOf(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).format(at);
}

/** "Thu 3 Dec" in the hospital's zone. */
export function dayOf(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'short',
    day: 'numeric',
    month: 'short',
  }).format(at);
}

const round = (x: number, digits = 1) => Number(x.toFixed(digits));

/**
 * The planned doses with their clock times. Dose 0 is the loading dose (when there is one) at
 * `firstDoseAt`; maintenance doses 1..count follow every `intervalH`, the first one interval after
 * the loading dose (or at `firstDoseAt` when there is no loading dose). With `oralLoadingPortionMg`
 * (the drug model's practical setting, phenytoin) an oral loading dose is listed in its portions,
 * each numbered 0, and maintenance starts as `maintenanceAfterPortions` says.
 */
export function planRegimen(
  regimen: Regimen,
  firstDoseAt: Date,
  timeZone: string,
  oralLoadingPortionMg?: number,
): PlannedRegimen {
  const infusionH = regimen.route === 'iv-infusion' ? regimen.infusionH : 0;
  const loading = regimen.loadingDoseMg ?? null;
  const doses: PlannedRegimen['doses'] = [];
  const add = (number: number, doseMg: number, start: Date, label?: string) => {
    const end = new Date(start.getTime() + infusionH * HOUR_MS);
    doses.push({
      number,
      label: label ?? (number === 0 ? 'loading dose' : `dose ${number}`),
      doseMg,
      startAt: start.toISOString(),
      endAt: end.toISOString(),
      clock: clockOf(start, timeZone),
    });
  };
  let offset = loading ? regimen.intervalH : 0;
  if (loading && regimen.route === 'oral' && oralLoadingPortionMg) {
    const portions = oralLoadingPortions(loading, oralLoadingPortionMg);
    portions.forEach((p, i) =>
      add(
        0,
        p.amount,
        new Date(firstDoseAt.getTime() + p.offsetH * HOUR_MS),
        portions.length > 1 ? `loading dose, part ${i + 1} of ${portions.length}` : undefined,
      ),
    );
    offset = maintenanceAfterPortions(portions, regimen.intervalH);
  } else if (loading) add(0, loading, firstDoseAt);
  for (let i = 1; i <= regimen.count; i += 1) {
    add(
      i,
      regimen.doseMg,
      new Date(firstDoseAt.getTime() + (offset + (i - 1) * regimen.intervalH) * HOUR_MS),
    );
  }
  const maintenance = doses.filter((d) => d.number > 0);
  const dividesDay = 24 % regimen.intervalH === 0;
  const clockTimes = dividesDay
    ? [...new Set(maintenance.slice(0, 24 / regimen.intervalH).map((d) => d.clock))].sort()
    : maintenance.slice(0, 4).map((d) => `${dayOf(new Date(d.startAt), timeZone)} ${d.clock}`);
  return {
    doseMg: regimen.doseMg,
    intervalH: regimen.intervalH,
    infusionH,
    route: regimen.route,
    count: regimen.count,
    loadingDoseMg: loading,
    firstDoseAt: firstDoseAt.toISOString(),
    infusionRateMgPerH:
      infusionH > 0 ? round(Math.max(regimen.doseMg, loading ?? 0) / infusionH, 0) : null,
    clockTimes,
    doses,
  };
}

/** Default draws: a peak after the end of a steady-ish dose and the trough before the next. */
export function defaultSampling(regimen: PlannedRegimen): SampleDrawInput[] {
  if (regimen.count < 2) {
    return [{ kind: 'peak', doseNumber: 1, anchor: 'after-end', offsetH: 1 }];
  }
  const k = Math.min(3, regimen.count - 1);
  return [
    { kind: 'peak', doseNumber: k, anchor: 'after-end', offsetH: 1 },
    { kind: 'trough', doseNumber: k + 1, anchor: 'before-start', offsetH: 0.5 },
  ];
}

const hoursText = (h: number) => `${round(h, 2)} h`;

/**
 * Turns draws tied to named doses into clock times and a nurse-readable instruction.
 * Field errors go into `errors` keyed `sampling.<i>.<field>`; questionable timing into warnings.
 */
export function planSampling(
  regimen: PlannedRegimen,
  draws: SampleDrawInput[],
  timeZone: string,
  errors: Record<string, string[]>,
  warnings: Warning[],
): PlannedDraw[] {
  const out: PlannedDraw[] = [];
  draws.forEach((draw, i) => {
    const dose = regimen.doses.find((d) => d.number === draw.doseNumber);
    if (!dose) {
      (errors[`sampling.${i}.doseNumber`] ??= []).push(
        `the regimen has ${regimen.count} doses; there is no dose ${draw.doseNumber}`,
      );
      return;
    }
    const start = new Date(dose.startAt).getTime();
    const end = new Date(dose.endAt).getTime();
    const at = new Date(
      draw.anchor === 'before-start'
        ? start - draw.offsetH * HOUR_MS
        : draw.anchor === 'after-start'
          ? start + draw.offsetH * HOUR_MS
          : end + draw.offsetH * HOUR_MS,
    );
    if (at.getTime() > start && at.getTime() < end) {
      warnings.push({
        code: 'draw-during-infusion',
        message: `The ${draw.kind} draw at ${clockOf(at, timeZone)} falls during the infusion of dose ${dose.number}`,
      });
    }
    if (draw.kind === 'trough' && draw.anchor !== 'before-start') {
      warnings.push({
        code: 'trough-not-before-dose',
        message: `A trough is normally drawn before the start of a dose (draw ${i + 1})`,
      });
    }
    const anchorText =
      draw.anchor === 'before-start'
        ? `before the START of`
        : draw.anchor === 'after-start'
          ? `after the START of`
          : `after the END of`;
    const when = draw.offsetH === 0 ? anchorText.replace(/^(before|after) /, 'at ') : anchorText;
    const label = `${draw.kind[0]!.toUpperCase()}${draw.kind.slice(1)}: draw ${
      draw.offsetH === 0 ? '' : `${hoursText(draw.offsetH)} `
    }${when} the ${dose.clock} dose (${dose.label}, ${dayOf(new Date(dose.startAt), timeZone)}) — at ${clockOf(at, timeZone)}`;
    out.push({ ...draw, at: at.toISOString(), clock: clockOf(at, timeZone), label });
  });
  return out;
}

/** Site limits used for warnings; local protocols may differ. */
export const PLAN_LIMITS = {
  /** Vancomycin infusion rate above which a warning is shown (consensus figure ≈ 1 g/h). */
  vancomycinMaxRateMgPerH: 1000,
  /** Vancomycin loading-dose cap commonly used by protocols. */
  vancomycinMaxLoadingMg: 3000,
} as const;

export function regimenWarnings(drug: string, regimen: PlannedRegimen): Warning[] {
  const warnings: Warning[] = [];
  if (
    drug === 'vancomycin' &&
    regimen.infusionRateMgPerH !== null &&
    regimen.infusionRateMgPerH > PLAN_LIMITS.vancomycinMaxRateMgPerH
  ) {
    warnings.push({
      code: 'infusion-rate-high',
      message: `Infusion rate ${regimen.infusionRateMgPerH} mg/h is above ${PLAN_LIMITS.vancomycinMaxRateMgPerH} mg/h; lengthen the infusion`,
    });
  }
  if (
    drug === 'vancomycin' &&
    regimen.loadingDoseMg !== null &&
    regimen.loadingDoseMg > PLAN_LIMITS.vancomycinMaxLoadingMg
  ) {
    warnings.push({
      code: 'loading-dose-high',
      message: `Loading dose ${regimen.loadingDoseMg} mg is above the usual ${PLAN_LIMITS.vancomycinMaxLoadingMg} mg cap`,
    });
  }
  return warnings;
}
