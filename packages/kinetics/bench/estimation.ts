/**
 * Estimation benchmarks (run alone: `tsx bench/estimation.ts`; or call `runEstimationBench()`).
 * Targets: MAP fit of a two-compartment vancomycin-like model with 4 levels < 50 ms median;
 * PTA of 10 000 virtual patients for one regimen < 1 s on 2 worker threads.
 */
import { pathToFileURL } from 'node:url';
import { fitMap } from '../src/estimation/map-fit';
import { createPtaPool } from '../src/pta/node-pool';
import { probabilityOfTargetAttainment, type PtaInput } from '../src/pta/pta';
import { simulate } from '../src/simulate';
import type { Dose, ModelStructure } from '../src/types';

export interface BenchLine {
  readonly name: string;
  readonly medianMs: number;
  /** Undefined for informational lines. */
  readonly targetMs: number | undefined;
  readonly modelEvaluations: number;
  readonly pass: boolean;
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
};

/** Run the estimation benchmarks and return one line per benchmark. */
export async function runEstimationBench(
  log: (s: string) => void = console.log,
): Promise<BenchLine[]> {
  const model: ModelStructure = { compartments: 2, elimination: 'linear' };
  const doses: Dose[] = Array.from({ length: 4 }, (_, i) => ({
    time: 12 * i,
    amount: 1000,
    route: 'infusion',
    duration: 1,
  }));
  const truth = { CL: 3, V1: 36, Q: 5, V2: 50 };
  const times = [37.5, 40, 44, 47.5];
  const sim = simulate({ model, parameters: truth, doses, outputTimes: times }).concentrations;
  const levels = times.map((t, i) => ({ time: t, value: sim[i]! * (i % 2 === 0 ? 0.93 : 1.08) }));
  const prior = {
    typical: { CL: 4, V1: 30, Q: 6, V2: 40 },
    variability: { CL: 0.3, V1: 0.25, Q: 0.4, V2: 0.4 },
    residualError: { additive: 1, proportional: 0.1 },
  };
  const fitTimes: number[] = [];
  let evals = 0;
  for (let i = 0; i < 45; i++) {
    const t0 = performance.now();
    const r = fitMap({ model, prior, doses, levels });
    const dt = performance.now() - t0;
    if (i >= 5) fitTimes.push(dt); // first runs warm the JIT
    evals = r.counters.evaluations;
  }
  const lines: BenchLine[] = [];
  const fitMedian = median(fitTimes);
  lines.push({
    name: 'MAP fit, 2-cmt, 4 levels, 4 parameters',
    medianMs: fitMedian,
    targetMs: 50,
    modelEvaluations: evals,
    pass: fitMedian < 50,
  });

  const input: PtaInput = {
    model,
    source: { kind: 'population', prior },
    regimens: [{ amount: 1250, interval: 12, infusionDuration: 1.5 }],
    target: { auc24: { min: 400, max: 600 }, trough: { max: 20 } },
    n: 10_000,
    seed: 2026,
  };
  const serial: number[] = [];
  let ptaEvals = 0;
  for (let i = 0; i < 7; i++) {
    const t0 = performance.now();
    ptaEvals = probabilityOfTargetAttainment(input).counters.modelEvaluations;
    serial.push(performance.now() - t0);
  }
  lines.push({
    name: 'PTA 10 000 patients, 1 regimen, 1 thread',
    medianMs: median(serial),
    targetMs: 1000,
    modelEvaluations: ptaEvals,
    pass: median(serial) < 1000,
  });

  const coldStart = performance.now();
  const pool = createPtaPool({ workers: 2 });
  try {
    const first = await pool.run(input);
    const cold = performance.now() - coldStart;
    // Informational: from TypeScript source each worker first loads tsx and transpiles the module graph.
    lines.push({
      name: 'PTA 10 000 patients, 2 workers, incl. pool start (info)',
      medianMs: cold,
      targetMs: undefined,
      modelEvaluations: first.counters.modelEvaluations,
      pass: true,
    });
    const warm: number[] = [];
    for (let i = 0; i < 7; i++) {
      const t0 = performance.now();
      await pool.run(input);
      warm.push(performance.now() - t0);
    }
    lines.push({
      name: 'PTA 10 000 patients, 2 workers, warm pool',
      medianMs: median(warm),
      targetMs: 1000,
      modelEvaluations: first.counters.modelEvaluations,
      pass: median(warm) < 1000,
    });
  } finally {
    await pool.close();
  }
  for (const l of lines) {
    const verdict = l.targetMs === undefined ? 'INFO' : l.pass ? 'PASS' : 'FAIL';
    const target = l.targetMs === undefined ? 'no target' : `target < ${l.targetMs} ms`;
    log(
      `${verdict}  ${l.name}: ${l.medianMs.toFixed(1)} ms (${target}), ${l.modelEvaluations} model evaluations`,
    );
  }
  return lines;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const lines = await runEstimationBench();
  process.exitCode = lines.every((l) => l.pass) ? 0 : 1;
}
