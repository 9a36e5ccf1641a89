/**
 * `pnpm validate`: run the engine over the reference cases in packages/kinetics/reference/*.json and print
 * one line per case: status, name, worst expected vs computed value, relative error, tolerance, source.
 * Exits 1 if any case fails. Simulation cases hold a `scenario` in the `pnpm kinetics simulate` format;
 * covariate cases hold `cases: [{ function, input, expected }]`.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as body from '../covariates/body-size';
import * as renal from '../covariates/renal';
import { runSimulateScenario } from './simulate';

type Fn = (...args: never[]) => number;
const COVARIATE_FUNCTIONS: Record<string, Fn> = { ...body, ...renal } as unknown as Record<
  string,
  Fn
>;

interface Row {
  readonly file: string;
  readonly name: string;
  readonly expected: number;
  readonly computed: number;
  readonly relErr: number;
  readonly tolerance: number;
  readonly source: string;
  readonly error?: string;
}

const rel = (a: number, e: number): number =>
  e === 0 ? Math.abs(a) : Math.abs(a - e) / Math.abs(e);

function runCase(file: string, c: Record<string, unknown>): Row {
  const base = {
    file,
    name: String(c.name),
    tolerance: Number(c.tolerance),
    source: String(c.source),
  };
  try {
    const pairs: [number, number][] = [];
    if (c.kind === 'covariate') {
      for (const k of c.cases as { function: string; input: unknown; expected: number }[]) {
        const f = COVARIATE_FUNCTIONS[k.function];
        if (!f) throw new Error(`unknown covariate function ${k.function}`);
        const args = (Array.isArray(k.input) ? k.input : [k.input]) as never[];
        pairs.push([k.expected, f(...args)]);
      }
    } else {
      const out = runSimulateScenario(c.scenario);
      const exp = c.expected as { concentrations?: number[]; aucs?: number[] };
      (exp.concentrations ?? []).forEach((e, i) =>
        pairs.push([e, out.concentrations[i] as number]),
      );
      (exp.aucs ?? []).forEach((e, i) => pairs.push([e, out.aucs[i] as number]));
    }
    let worst: [number, number] = pairs[0] ?? [NaN, NaN];
    for (const p of pairs) if (rel(p[1], p[0]) > rel(worst[1], worst[0])) worst = p;
    return { ...base, expected: worst[0], computed: worst[1], relErr: rel(worst[1], worst[0]) };
  } catch (e) {
    return { ...base, expected: NaN, computed: NaN, relErr: Infinity, error: (e as Error).message };
  }
}

function main(): number {
  const dir = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'reference');
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.json'))
    .sort();
  const rows = files.map((f) =>
    runCase(f, JSON.parse(readFileSync(join(dir, f), 'utf8')) as Record<string, unknown>),
  );
  const num = (x: number): string =>
    (Number.isFinite(x) ? x.toPrecision(10) : String(x)).padStart(16);
  process.stdout.write(
    `${'status'.padEnd(6)} ${'case'.padEnd(44)} ${'expected'.padStart(16)} ${'computed'.padStart(16)} ${'rel. error'.padStart(10)} ${'tol'.padStart(7)}  source\n`,
  );
  let failed = 0;
  for (const r of rows) {
    const ok = r.error === undefined && r.relErr <= r.tolerance;
    if (!ok) failed++;
    const src = r.source.length > 60 ? `${r.source.slice(0, 57)}...` : r.source;
    process.stdout.write(
      `${(ok ? 'PASS' : 'FAIL').padEnd(6)} ${r.name.slice(0, 44).padEnd(44)} ${num(r.expected)} ${num(r.computed)} ${r.relErr.toExponential(2).padStart(10)} ${r.tolerance.toExponential(0).padStart(7)}  ${r.error ? `ERROR ${r.error}` : src}\n`,
    );
  }
  process.stdout.write(`${rows.length - failed} passed, ${failed} failed\n`);
  return failed === 0 && rows.length > 0 ? 0 : 1;
}

process.exitCode = main();
