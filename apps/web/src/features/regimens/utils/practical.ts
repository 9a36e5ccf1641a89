/**
 * Practical amounts for the what-if controls: doses snap to the drug's rounding step and the
 * infusion can never run faster than the drug's maximum rate. Settings come from the course's
 * drug model (site-configurable in the library); this module only applies them.
 */
export interface PracticalSettings {
  /** Round doses to multiples of this, mg. */
  doseRoundingMg: number;
  /** Maximum infusion rate, mg/h; null when the library sets no limit. */
  maxInfusionRateMgPerH: number | null;
  /** Usual dosing intervals, h. */
  usualIntervalsH: number[];
  /** Usual infusion duration, h. */
  defaultInfusionH: number;
  /** Oral loading doses are given in portions of at most this, mg (phenytoin); null: one dose. */
  oralLoadingPortionMg: number | null;
}

/** Infusion times are offered in quarter hours (common practice: pump programming and nursing rounds). */
export const INFUSION_STEP_H = 0.25;

/** The nearest multiple of the rounding step, never below one step. */
export function snapDose(mg: number, roundingMg: number): number {
  if (!Number.isFinite(mg) || mg <= 0) return roundingMg;
  const step = roundingMg > 0 ? roundingMg : 1;
  return Math.max(step, Math.round(mg / step) * step);
}

/** The shortest infusion the rate cap allows for this dose, h (0 when there is no cap). */
export function minimumInfusionHours(doseMg: number, maxRateMgPerH: number | null): number {
  if (maxRateMgPerH === null || maxRateMgPerH <= 0) return 0;
  return doseMg / maxRateMgPerH;
}

/**
 * The infusion time to use: snapped up to quarter hours and never shorter than the rate cap
 * allows. Returns the time and whether the cap lengthened what was asked for.
 */
export function enforceInfusionTime(
  askedH: number,
  doseMg: number,
  maxRateMgPerH: number | null,
): { infusionH: number; limitedByRate: boolean; minimumH: number } {
  const minimumH = minimumInfusionHours(doseMg, maxRateMgPerH);
  const snappedMin = Math.ceil(minimumH / INFUSION_STEP_H - 1e-9) * INFUSION_STEP_H;
  const asked = Math.max(INFUSION_STEP_H, Math.round(askedH / INFUSION_STEP_H) * INFUSION_STEP_H);
  if (asked < snappedMin) return { infusionH: snappedMin, limitedByRate: true, minimumH };
  return { infusionH: asked, limitedByRate: false, minimumH };
}

/** Rate of an infusion, mg/h. */
export function infusionRate(doseMg: number, infusionH: number): number | null {
  return infusionH > 0 ? doseMg / infusionH : null;
}

/** Practical settings read from a drug-model definition (a library entry), with safe fallbacks. */
export function practicalFromDefinition(definition: Record<string, unknown> | undefined): {
  settings: PracticalSettings;
  found: boolean;
} {
  const p = (definition?.practical ?? null) as Partial<PracticalSettings> | null;
  const found =
    p !== null &&
    typeof p.doseRoundingMg === 'number' &&
    p.doseRoundingMg > 0 &&
    'maxInfusionRateMgPerH' in p;
  return {
    found,
    settings: {
      doseRoundingMg: found ? (p.doseRoundingMg as number) : 1,
      maxInfusionRateMgPerH:
        found && typeof p.maxInfusionRateMgPerH === 'number' ? p.maxInfusionRateMgPerH : null,
      usualIntervalsH:
        p && Array.isArray(p.usualIntervalsH) && p.usualIntervalsH.length > 0
          ? [...p.usualIntervalsH]
          : [8, 12, 24, 36, 48],
      defaultInfusionH: p && typeof p.defaultInfusionH === 'number' ? p.defaultInfusionH : 1,
      oralLoadingPortionMg:
        p && typeof p.oralLoadingPortionMg === 'number' && p.oralLoadingPortionMg > 0
          ? p.oralLoadingPortionMg
          : null,
    },
  };
}
