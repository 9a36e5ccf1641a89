import { buildEvents, sameTime, type EventSchedule } from './dosing/events';
import { validateDoses } from './dosing/validate-doses';
import { EngineError } from './errors';
import { RK4_STABILITY_LIMIT } from './integrator/rk4';
import { fastestRate, hasOralDose, resolveModel, type ResolvedModel } from './models/parameters';
import { STATE_AUC, STATE_CENTRAL, STATE_DEPOT, STATE_SIZE } from './models/rhs';
import { createStepper, type PkStepper } from './models/steppers';
import { requireFinite, requirePositive } from './models/validate';
import type { Dose, ModelStructure, PkParameters } from './types';

/** Options of `simulate`. Every field is optional; missing ones come from `defaultSimulateOptions`. */
export interface SimulateOptions {
  /** Largest RK4 step, h. The step actually used may be smaller (see `maxRateStep` and segment lengths). */
  readonly maxStep: number;
  /**
   * Largest h·λ allowed, with λ the fastest rate constant in the model (see `fastestRate`). Must be in (0, 1],
   * i.e. at most ~36 % of RK4's stability limit 2.785: whatever `maxStep` asks for, the step is capped so
   * every mode decays monotonically (0 < R(−hλ) < 1) and the curve cannot oscillate, go negative or overshoot.
   */
  readonly maxRateStep: number;
  /** Compute the step-doubling error estimate (costs ≈ 0.75 of the main run). */
  readonly estimateError: boolean;
  /** Refuse (throw `step-limit`) a problem that would need more RK4 steps than this. */
  readonly maxSteps: number;
  /** `outcome` becomes `inaccurate` if errorEstimate exceeds this fraction of the largest concentration. */
  readonly relativeErrorTolerance: number;
}

/**
 * Default options of `simulate`.
 * - `maxStep` 0.25 h and `maxRateStep` 0.05: with hλ ≤ 0.05 RK4's relative error per unit λt is about
 *   (hλ)⁴/120 ≈ 5e-8, so the profile agrees with the closed forms to ≤ 1e-6 relative over ~20 time constants.
 * - `maxSteps` 5 000 000 guards against a runaway problem (e.g. an absurd rate constant).
 */
export const defaultSimulateOptions: Readonly<SimulateOptions> = Object.freeze({
  maxStep: 0.25,
  maxRateStep: 0.05,
  estimateError: true,
  maxSteps: 5_000_000,
  relativeErrorTolerance: 1e-4,
});

/** Input of `simulate`. Units: mg, L, h, L/h, mg/h, mg/L. */
export interface SimulateInput {
  readonly model: ModelStructure;
  readonly parameters: PkParameters;
  readonly doses: readonly Dose[];
  /** Times (h) at which to report the central concentration; any order, duplicates allowed. */
  readonly outputTimes: readonly number[];
  /** AUC windows `[from, to]` (h), integrated exactly by the AUC state. */
  readonly aucWindows?: readonly (readonly [number, number])[];
  readonly options?: Partial<SimulateOptions>;
}

/** `completed`: normal; `inaccurate`: the error estimate exceeds `relativeErrorTolerance`. */
export type SimulateOutcome = 'completed' | 'inaccurate';

/** Result of `simulate`. Arrays are in the order of the request. */
export interface SimulateResult {
  /** The requested output times, h (a copy). */
  readonly times: number[];
  /** Central concentration at each output time, mg/L (after any dose given at that exact time). */
  readonly concentrations: number[];
  /** Cumulative AUC from the start of the simulation at each output time, mg·h/L. */
  readonly cumulativeAucs: number[];
  /** AUC over each requested window, mg·h/L. */
  readonly aucs: number[];
  /**
   * Step-doubling (Richardson) estimate of the global error of the concentrations, mg/L (max over the
   * companion's check points); `null` when `estimateError` is false.
   */
  readonly errorEstimate: number | null;
  readonly outcome: SimulateOutcome;
  readonly counters: {
    /** RK4 steps of the main run. */
    readonly steps: number;
    /** Right-hand-side evaluations of the main run plus the error companion. */
    readonly evaluations: number;
    /** RK4 steps of the two error-estimate companion runs. */
    readonly errorSteps: number;
  };
  /** The largest step the main run used, h. */
  readonly stepSize: number;
}

interface Plan {
  readonly resolved: ResolvedModel;
  readonly events: EventSchedule;
  readonly h: number;
}

function mergeOptions(options: Partial<SimulateOptions> | undefined, fn: string): SimulateOptions {
  const o: SimulateOptions = { ...defaultSimulateOptions, ...(options ?? {}) };
  requirePositive(fn, 'options.maxStep', o.maxStep);
  requirePositive(fn, 'options.maxRateStep', o.maxRateStep);
  if (o.maxRateStep > 1) {
    throw new EngineError(
      'invalid-input',
      `${fn}: options.maxRateStep must be ≤ 1 (RK4 is stable only for h·λ < ${RK4_STABILITY_LIMIT}; we stay far inside)`,
      'options.maxRateStep',
    );
  }
  requirePositive(fn, 'options.maxSteps', o.maxSteps);
  requirePositive(fn, 'options.relativeErrorTolerance', o.relativeErrorTolerance);
  return o;
}

function planOf(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
  o: SimulateOptions,
  fn: string,
): Plan {
  validateDoses(doses, fn);
  const resolved = resolveModel(model, parameters, hasOralDose(doses), fn);
  const lambda = fastestRate(resolved);
  const h = Math.min(o.maxStep, o.maxRateStep / lambda);
  return { resolved, events: buildEvents(doses, resolved), h };
}

/** Number of equal steps of at most `h` that cover `span` exactly. */
function stepsFor(span: number, h: number): number {
  return Math.max(1, Math.ceil(span / h - 1e-9));
}

/**
 * Integrate over a sorted grid that contains every event time; record C and AUC at each grid point
 * (right-continuous: after the events at that instant). Returns the number of RK4 steps taken.
 */
function integrateGrid(
  step: PkStepper,
  plan: Plan,
  grid: Float64Array,
  eventAt: Int32Array,
  h: number,
  outC: Float64Array,
  outAuc: Float64Array,
  multiplier = 1,
): number {
  const { events } = plan;
  const invV1 = 1 / plan.resolved.V1;
  const y = new Float64Array(STATE_SIZE);
  let rate = 0;
  let steps = 0;
  const g = grid.length;
  for (let i = 0; i < g; i++) {
    const e = eventAt[i] as number;
    if (e >= 0) {
      y[STATE_CENTRAL] = (y[STATE_CENTRAL] as number) + (events.bolus[e] as number);
      y[STATE_DEPOT] = (y[STATE_DEPOT] as number) + (events.depot[e] as number);
      rate = events.rate[e] as number;
    }
    outC[i] = (y[STATE_CENTRAL] as number) * invV1;
    outAuc[i] = y[STATE_AUC] as number;
    if (i + 1 < g) {
      const span = (grid[i + 1] as number) - (grid[i] as number);
      const n = stepsFor(span, h) * multiplier;
      step(y, span / n, n, rate);
      steps += n;
    }
  }
  return steps;
}

/**
 * Sorted union of event times and extra times (deduplicated with `sameTime`). `eventAt` maps grid → event
 * index (−1 if none); `extraAt` maps each extra time (in the caller's order) → its grid index.
 * Typed arrays throughout; the extra times are sorted only if they are not already in order.
 */
function mergeGrid(
  events: Float64Array,
  extra: ArrayLike<number>,
): { grid: Float64Array; eventAt: Int32Array; extraAt: Int32Array } {
  const ne = events.length;
  const m = extra.length;
  let order: Int32Array | null = null;
  for (let j = 1; j < m; j++) {
    if ((extra[j] as number) < (extra[j - 1] as number)) {
      const idx = Array.from({ length: m }, (_, k) => k);
      idx.sort((x, y) => (extra[x] as number) - (extra[y] as number));
      order = Int32Array.from(idx);
      break;
    }
  }
  const grid = new Float64Array(ne + m);
  const eventAt = new Int32Array(ne + m);
  const extraAt = new Int32Array(m);
  let g = 0;
  let i = 0;
  let j = 0;
  while (i < ne || j < m) {
    const te = i < ne ? (events[i] as number) : Infinity;
    const jj = j < m ? (order ? (order[j] as number) : j) : -1;
    const tx = jj >= 0 ? (extra[jj] as number) : Infinity;
    if (te <= tx) {
      if (g > 0 && sameTime(grid[g - 1] as number, te)) {
        grid[g - 1] = te;
        eventAt[g - 1] = i;
      } else {
        grid[g] = te;
        eventAt[g] = i;
        g++;
      }
      i++;
    } else {
      if (g > 0 && sameTime(grid[g - 1] as number, tx)) {
        extraAt[jj] = g - 1;
      } else {
        grid[g] = tx;
        eventAt[g] = -1;
        extraAt[jj] = g;
        g++;
      }
      j++;
    }
  }
  return { grid: grid.subarray(0, g), eventAt: eventAt.subarray(0, g), extraAt };
}

/**
 * Step-doubling (Richardson) error estimate on a coarser companion (Hairer, Nørsett, Wanner 1993, §II.4):
 * the companion integrates between events, the first and last output time and up to `COMPANION_CHECKS`
 * evenly picked output times (where the error is compared), with nominal steps
 * H = 4h and H/2 = 2h (each segment split into m and exactly 2m equal steps). For RK4 (order 4) the error of
 * the H/2 run is ≈ (y_{H/2} − y_H)/(2⁴ − 1) and the main run, whose steps are ≤ h = (H/2)/2, has about
 * 1/16 of that. We report max |C_{H/2} − C_H| / 15 / 16 over the companion's points. Where the main run's
 * steps are shortened by output times it is more accurate than this, so the estimate is conservative there.
 */
function errorEstimateOf(
  plan: Plan,
  first: number,
  last: number,
  outputTimes: readonly number[],
): { estimate: number; steps: number } {
  const checks = [first, last];
  const stride = Math.max(1, Math.ceil(outputTimes.length / COMPANION_CHECKS));
  for (let i = 0; i < outputTimes.length; i += stride) checks.push(outputTimes[i] as number);
  const { grid, eventAt } = mergeGrid(plan.events.times, checks);
  const g = grid.length;
  const coarseC = new Float64Array(g);
  const fineC = new Float64Array(g);
  const scratch = new Float64Array(g);
  // Coarse run: per segment m = ceil(span / 4h) steps; fine run: exactly 2m.
  const hCoarse = 4 * plan.h;
  const step = createStepper(plan.resolved);
  let steps = integrateGrid(step, plan, grid, eventAt, hCoarse, coarseC, scratch);
  steps += integrateGrid(step, plan, grid, eventAt, hCoarse, fineC, scratch, 2);
  let est = 0;
  for (let i = 0; i < g; i++) {
    const d = Math.abs((fineC[i] as number) - (coarseC[i] as number)) / 15 / 16;
    if (d > est) est = d;
  }
  return { estimate: est, steps };
}

/** Most output times the error companion also stops at to compare its two runs (besides events). */
const COMPANION_CHECKS = 64;

/**
 * Simulate the central concentration and AUC of a one- or two-compartment model with linear or
 * Michaelis-Menten elimination under an explicit dose list, by event-aligned fixed-step RK4.
 *
 * Method: the dose list becomes a schedule of discontinuities (bolus jumps, depot additions at dose + tlag,
 * infusion starts and stops); the time axis is split at the union of those, the output times and the AUC
 * window ends, and each piece is covered by a whole number of equal RK4 steps (`rk4Advance`, run through
 * the model's specialised stepper `createStepper`), so steps land
 * exactly on every event. Step h = min(maxStep, maxRateStep/λmax), λmax the fastest rate in the model.
 * AUC is the fourth state (dAUC/dt = C). The state is zero before the first event. Concentrations are
 * right-continuous: a bolus at exactly an output time is included in that output.
 * Equations: see `createSystem`; RK4: see `rk4Advance`.
 *
 * @throws {EngineError} `invalid-input` naming the field (e.g. `doses[0].amount`, `parameters.Km`,
 *   `outputTimes[3]`); `step-limit` if the problem would need more than `maxSteps` steps.
 * @example
 * simulate({
 *   model: { compartments: 1, elimination: 'linear' },
 *   parameters: { CL: 5, V1: 50 },
 *   doses: [{ time: 0, amount: 1000, route: 'bolus' }],
 *   outputTimes: [0, 12],
 *   aucWindows: [[0, 12]],
 * }).concentrations // => [20, 6.0238...]  (20·e^(−0.1·12))
 */
export function simulate(input: SimulateInput): SimulateResult {
  const fn = 'simulate';
  if (input == null || typeof input !== 'object') {
    throw new EngineError('invalid-input', `${fn}: input must be an object`, 'input');
  }
  const o = mergeOptions(input.options, fn);
  const plan = planOf(input.model, input.parameters, input.doses, o, fn);
  const outputTimes = input.outputTimes;
  if (!Array.isArray(outputTimes)) {
    throw new EngineError('invalid-input', `${fn}: outputTimes must be an array`, 'outputTimes');
  }
  for (let i = 0; i < outputTimes.length; i++)
    requireFinite(fn, `outputTimes[${i}]`, outputTimes[i]);
  const windows = input.aucWindows ?? [];
  if (!Array.isArray(windows)) {
    throw new EngineError('invalid-input', `${fn}: aucWindows must be an array`, 'aucWindows');
  }
  const extra: number[] = outputTimes.slice();
  for (let i = 0; i < windows.length; i++) {
    const w = windows[i];
    if (!Array.isArray(w) || w.length !== 2) {
      throw new EngineError(
        'invalid-input',
        `${fn}: aucWindows[${i}] must be [from, to]`,
        `aucWindows[${i}]`,
      );
    }
    const a = requireFinite(fn, `aucWindows[${i}][0]`, w[0]);
    const b = requireFinite(fn, `aucWindows[${i}][1]`, w[1]);
    if (b < a) {
      throw new EngineError(
        'invalid-input',
        `${fn}: aucWindows[${i}] must have from ≤ to (got [${a}, ${b}])`,
        `aucWindows[${i}]`,
      );
    }
    extra.push(a, b);
  }
  const { grid, eventAt, extraAt } = mergeGrid(plan.events.times, extra);
  const g = grid.length;
  if (g === 0) {
    return {
      times: [],
      concentrations: [],
      cumulativeAucs: [],
      aucs: [],
      errorEstimate: o.estimateError ? 0 : null,
      outcome: 'completed',
      counters: { steps: 0, evaluations: 0, errorSteps: 0 },
      stepSize: plan.h,
    };
  }
  const first = grid[0] as number;
  const last = grid[g - 1] as number;
  const expected = (last - first) / plan.h + g;
  if (expected > o.maxSteps) {
    throw new EngineError(
      'step-limit',
      `${fn}: the problem needs about ${Math.ceil(expected)} RK4 steps (options.maxSteps is ${o.maxSteps}); shorten the time span`,
      'options.maxSteps',
    );
  }
  const gridC = new Float64Array(g);
  const gridAuc = new Float64Array(g);
  const steps = integrateGrid(
    createStepper(plan.resolved),
    plan,
    grid,
    eventAt,
    plan.h,
    gridC,
    gridAuc,
  );

  const concentrations = new Array<number>(outputTimes.length);
  const cumulativeAucs = new Array<number>(outputTimes.length);
  let cmax = 0;
  for (let i = 0; i < outputTimes.length; i++) {
    const k = extraAt[i] as number;
    concentrations[i] = gridC[k] as number;
    cumulativeAucs[i] = gridAuc[k] as number;
  }
  for (let i = 0; i < g; i++) if ((gridC[i] as number) > cmax) cmax = gridC[i] as number;
  const nOut = outputTimes.length;
  const aucs = windows.map(
    (_, w) =>
      (gridAuc[extraAt[nOut + 2 * w + 1] as number] as number) -
      (gridAuc[extraAt[nOut + 2 * w] as number] as number),
  );
  let errorEstimate: number | null = null;
  let errorSteps = 0;
  if (o.estimateError) {
    const e = errorEstimateOf(plan, first, last, outputTimes);
    errorEstimate = e.estimate;
    errorSteps = e.steps;
  }
  const inaccurate = errorEstimate !== null && errorEstimate > o.relativeErrorTolerance * cmax;
  return {
    times: outputTimes.slice(),
    concentrations,
    cumulativeAucs,
    aucs,
    errorEstimate,
    outcome: inaccurate ? 'inaccurate' : 'completed',
    counters: { steps, evaluations: 4 * (steps + errorSteps), errorSteps },
    stepSize: plan.h,
  };
}

/**
 * Cheaper convenience for fitting: concentrations (mg/L) at `times` by the same RK4 as `simulate`,
 * without the error-estimate companion.
 * @throws {EngineError} as `simulate`.
 * @example
 * concentrationsAt({ compartments: 1, elimination: 'linear' }, { CL: 5, V1: 50 },
 *   [{ time: 0, amount: 1000, route: 'bolus' }], [12]) // => [6.0238...]
 */
export function concentrationsAt(
  model: ModelStructure,
  parameters: PkParameters,
  doses: readonly Dose[],
  times: readonly number[],
  options?: Partial<SimulateOptions>,
): number[] {
  return simulate({
    model,
    parameters,
    doses,
    outputTimes: times,
    options: { ...options, estimateError: false },
  }).concentrations;
}
