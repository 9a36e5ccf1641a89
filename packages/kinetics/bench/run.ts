/**
 * `pnpm bench`: time a 14-day two-compartment q8h infusion profile with 0.1 h output.
 * - RK4 `simulate` (default options, with the step-doubling error companion) and `concentrationsAt` (without):
 *   median of many runs after warm-up; steps per second.
 * - The same problem by odex 2.0.4 (Hairer's ODEX, dense output on the 0.1 h grid, restarted at each event),
 *   at the loosest tolerance whose max relative error is equal to or better than RK4's; the ratio of medians.
 * Accuracy is measured against the closed-form superposition (closedFormConcentrations).
 */
import { createRequire } from 'node:module';
import { performance } from 'node:perf_hooks';
import type * as OdexModule from 'odex';
import { closedFormConcentrations } from '../src/closed-form/linear';
import { concentrationsAt, simulate } from '../src/simulate';
import type { Dose, ModelStructure, PkParameters } from '../src/types';

// odex is CommonJS; types come from types/odex.d.ts. Load its file directly: tsx would map the bare
// specifier 'odex' through the tsconfig paths entry to the .d.ts.
const { Solver } = createRequire(import.meta.url)('odex/src/odex.js') as typeof OdexModule;

const model: ModelStructure = { compartments: 2, elimination: 'linear' };
const parameters: PkParameters = { CL: 4.5, V1: 58.4, Q: 6.5, V2: 38.4 };
const doses: Dose[] = Array.from({ length: 42 }, (_, i) => ({
  time: 8 * i,
  amount: 1000,
  route: 'infusion',
  duration: 1,
}));
const outputTimes = Array.from({ length: 3361 }, (_, i) => i / 10);

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
}
function timeIt(f: () => void, runs: number): number {
  for (let i = 0; i < 20; i++) f();
  const t: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    f();
    t.push(performance.now() - t0);
  }
  return median(t);
}
function maxRel(c: readonly number[], times: readonly number[]): number {
  const exact = closedFormConcentrations(model, parameters, doses, times);
  let w = 0;
  exact.forEach((e, i) => {
    if (e > 1e-3) w = Math.max(w, Math.abs((c[i] as number) - e) / e);
  });
  return w;
}

const k10 = 4.5 / 58.4;
const k12 = 6.5 / 58.4;
const k21 = 6.5 / 38.4;
function odexProfile(tol: number): { times: number[]; c: number[] } {
  const solver = new Solver(2);
  solver.denseOutput = true;
  solver.relativeTolerance = tol;
  solver.absoluteTolerance = tol;
  solver.maxSteps = 100000;
  const events: number[] = [];
  for (const d of doses) events.push(d.time, d.time + 1);
  events.push(336);
  const times: number[] = [];
  const c: number[] = [];
  let y = [0, 0];
  for (let i = 0; i + 1 < events.length; i++) {
    const a = events[i] as number;
    const b = events[i + 1] as number;
    const rate = i % 2 === 0 ? 1000 : 0;
    const f = (_x: number, s: number[]): number[] => {
      const a1 = s[0] as number;
      const a2 = s[1] as number;
      return [rate - (k10 + k12) * a1 + k21 * a2, k12 * a1 - k21 * a2];
    };
    const r = solver.solve(
      f,
      a,
      y,
      b,
      solver.grid(0.1, (x, yy) => {
        if (x < b - 1e-9) {
          times.push(x);
          c.push((yy[0] as number) / 58.4);
        }
      }),
    );
    y = r.y.slice(0, 2);
  }
  times.push(336);
  c.push((y[0] as number) / 58.4);
  return { times, c };
}

const runs = 300;
const sim = simulate({ model, parameters, doses, outputTimes });
const rk4Err = maxRel(sim.concentrations, outputTimes);
const tSim = timeIt(() => void simulate({ model, parameters, doses, outputTimes }), runs);
const tConc = timeIt(() => void concentrationsAt(model, parameters, doses, outputTimes), runs);

let chosen = 0;
let odexErr = Infinity;
for (const tol of [1e-5, 3e-6, 1e-6, 3e-7, 1e-7, 3e-8, 1e-8, 3e-9, 1e-9, 1e-10, 1e-11, 1e-12]) {
  const o = odexProfile(tol);
  odexErr = maxRel(o.c, o.times);
  chosen = tol;
  if (odexErr <= rk4Err) break;
}
const tOdex = timeIt(() => void odexProfile(chosen), Math.max(30, runs / 5));

const line = (k: string, v: string): void => void process.stdout.write(`${k.padEnd(52)} ${v}\n`);
line('problem', '2-cmt, 1000 mg q8h 1 h infusion × 42 (14 days), 3361 outputs at 0.1 h');
line('RK4 simulate (with error estimate): median', `${tSim.toFixed(3)} ms`);
line('RK4 concentrationsAt (no error estimate): median', `${tConc.toFixed(3)} ms`);
line(
  'RK4 steps (main + error companion)',
  `${sim.counters.steps} + ${sim.counters.errorSteps}, h = ${sim.stepSize.toFixed(4)} h`,
);
line(
  'RK4 steps per second (main + companion, simulate)',
  `${(((sim.counters.steps + sim.counters.errorSteps) / tSim) * 1000).toExponential(3)}`,
);
line(
  'RK4 max relative error vs closed form',
  `${rk4Err.toExponential(2)} (error estimate ${sim.errorEstimate?.toExponential(2)} mg/L)`,
);
line(`odex (tol ${chosen.toExponential(0)}) max relative error`, odexErr.toExponential(2));
line('odex median', `${tOdex.toFixed(3)} ms`);
line('ratio odex / RK4 simulate', `${(tOdex / tSim).toFixed(1)}×`);
line(
  'target',
  `RK4 < 1 ms: ${tSim < 1 ? 'met' : 'NOT met'}; ≥ 3× faster than odex: ${tOdex / tSim >= 3 ? 'met' : 'NOT met'}`,
);

// Estimation benchmarks (MAP fit, PTA serial and pooled) in the same `pnpm bench` run.
const { runEstimationBench } = await import('./estimation');
process.stdout.write('\n');
const estimationLines = await runEstimationBench();
if (!estimationLines.every((l) => l.pass)) process.exitCode = 1;
