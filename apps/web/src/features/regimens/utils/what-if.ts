import {
  maintenanceAfterPortions,
  oralLoadingPortions,
  simulate,
  type Dose,
  type ModelStructure,
  type PkParameters,
} from '@ebbtide/kinetics';

/**
 * What-if simulation in the browser with the same engine the server uses: the recorded doses,
 * then a loading dose (optional) and the maintenance regimen. Exposure is read over the last
 * simulated interval (steady state approached): peak at the end of the infusion, trough just
 * before the next dose, AUC24 = AUC over the interval × 24 / interval.
 */
export interface WhatIfRegimen {
  doseMg: number;
  intervalH: number;
  /** 0 for a bolus. */
  infusionH: number;
  loadingDoseMg: number | null;
  /** Oral/IM doses are absorbed (the engine's first-order `oral` route, with the model's F and ka). */
  absorbed?: boolean;
  /** Oral loading split into portions of at most this, mg, 2 h apart (phenytoin); null: one dose. */
  loadingPortionMg?: number | null;
  /** Hour of the first regimen dose on the course timeline. */
  startHour: number;
  /** Maintenance doses to simulate. */
  count: number;
}

export interface WhatIfResult {
  points: { hour: number; concentrationMgL: number }[];
  peakMgL: number;
  troughMgL: number;
  auc24: number;
  /** AUC over the first 24 h of the regimen, mg·h/L. */
  auc24FirstDay: number;
  /** Milliseconds the simulation took (for the "within one frame" promise). */
  elapsedMs: number;
}

/** The model structure from a drug-model definition, or guessed from the parameter names. */
export function structureOf(
  definition: Record<string, unknown> | undefined,
  parameters: Record<string, number>,
): ModelStructure {
  const s = definition?.structure as Partial<ModelStructure> | undefined;
  if (s && (s.compartments === 1 || s.compartments === 2) && s.elimination) {
    return { compartments: s.compartments, elimination: s.elimination };
  }
  return {
    compartments: parameters.Q !== undefined && parameters.V2 !== undefined ? 2 : 1,
    elimination: parameters.Vmax !== undefined ? 'michaelis-menten' : 'linear',
  };
}

export function regimenDoses(r: WhatIfRegimen): Dose[] {
  const doses: Dose[] = [];
  const shape = (time: number, amount: number): Dose =>
    r.absorbed
      ? { time, amount, route: 'oral' }
      : r.infusionH > 0
        ? { time, amount, route: 'infusion', duration: r.infusionH }
        : { time, amount, route: 'bolus' };
  let t = r.startHour;
  if (r.loadingDoseMg && r.absorbed && r.loadingPortionMg) {
    // As the server's regimen finder and plan give it (dosing/oral-loading of the engine).
    const portions = oralLoadingPortions(r.loadingDoseMg, r.loadingPortionMg);
    for (const p of portions) doses.push(shape(r.startHour + p.offsetH, p.amount));
    t = r.startHour + maintenanceAfterPortions(portions, r.intervalH);
  } else if (r.loadingDoseMg) {
    doses.push(shape(t, r.loadingDoseMg));
    t += r.intervalH;
  }
  for (let i = 0; i < r.count; i++) {
    doses.push(shape(t, r.doseMg));
    t += r.intervalH;
  }
  return doses;
}

export function simulateWhatIf(
  model: ModelStructure,
  parameters: PkParameters,
  history: readonly Dose[],
  regimen: WhatIfRegimen,
  stepH = 0.25,
): WhatIfResult {
  const started = performance.now();
  const planned = regimenDoses(regimen);
  const last = planned[planned.length - 1] as Dose;
  const from = Math.min(regimen.startHour, ...history.map((d) => d.time));
  const end = last.time + regimen.intervalH;
  const outputTimes: number[] = [];
  for (let t = Math.max(0, from); t <= end + 1e-9; t += stepH) outputTimes.push(t);
  const lastStart = last.time;
  const peakTime = lastStart + regimen.infusionH;
  const troughTime = end - 1e-6;
  outputTimes.push(peakTime, troughTime);
  const result = simulate({
    model,
    parameters,
    doses: [...history, ...planned],
    outputTimes,
    aucWindows: [
      [lastStart, end],
      [regimen.startHour, regimen.startHour + 24],
    ],
    options: { estimateError: false },
  });
  const n = outputTimes.length;
  const points = result.times
    .slice(0, n - 2)
    .map((hour, i) => ({ hour, concentrationMgL: result.concentrations[i] as number }));
  const aucInterval = result.aucs[0] as number;
  return {
    points,
    peakMgL: result.concentrations[n - 2] as number,
    troughMgL: result.concentrations[n - 1] as number,
    auc24: (aucInterval * 24) / regimen.intervalH,
    auc24FirstDay: result.aucs[1] as number,
    elapsedMs: performance.now() - started,
  };
}
