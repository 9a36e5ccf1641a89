import { describe, expect, it } from 'vitest';
import { fitCommand, runFitCommand, type CliIo } from '../cli/fit';
import { runTwoLevelCommand, twoLevelCommand } from '../cli/two-level';

function memoryIo(stdin: string): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return {
    readStdin: async () => stdin,
    stdout: (s) => void out.push(s),
    stderr: (s) => void err.push(s),
    out,
    err,
  };
}

const fitInput = {
  model: { compartments: 1, elimination: 'linear' },
  typical: { CL: 4, V1: 50 },
  variability: { CL: 0.3, V1: 0.2 },
  residualError: { additive: 1, proportional: 0.1 },
  doses: [
    { time: 0, amount: 1000, duration: 1 },
    { time: 12, amount: 1000, duration: 1 },
  ],
  levels: [
    { time: 14, value: 25 },
    { time: 23.5, value: 12 },
  ],
};

describe('cli/fit', () => {
  it('fitCommand writes {estimates, standardErrors, predictions, objective}', async () => {
    const io = memoryIo(JSON.stringify(fitInput));
    expect(await fitCommand([], io)).toBe(0);
    const out = JSON.parse(io.out.join('')) as Record<string, unknown>;
    expect(Object.keys(out).sort()).toEqual([
      'estimates',
      'objective',
      'predictions',
      'standardErrors',
    ]);
    expect((out.predictions as number[]).length).toBe(2);
    expect(Object.keys(out.estimates as object).sort()).toEqual(['CL', 'V1']);
  });

  it('a parameter without variability is fixed at its typical value', () => {
    const r = runFitCommand({ ...fitInput, variability: { CL: 0.3 } });
    expect(Object.keys(r.output.estimates)).toEqual(['CL']);
  });

  it('invalid input exits non-zero naming the field', async () => {
    const bad = memoryIo(JSON.stringify({ ...fitInput, levels: [{ time: 5, value: -3 }] }));
    expect(await fitCommand([], bad)).not.toBe(0);
    expect(bad.err.join('')).toMatch(/levels\[0\]\.value/);
    const noModel = memoryIo(JSON.stringify({ ...fitInput, model: undefined }));
    expect(await fitCommand([], noModel)).not.toBe(0);
    expect(noModel.err.join('')).toMatch(/model/);
    const notJson = memoryIo('{nope');
    expect(await fitCommand([], notJson)).not.toBe(0);
    expect(notJson.err.join('')).toMatch(/not valid JSON/);
  });
});

describe('cli/two-level', () => {
  // Constructed first-dose case (pk-reference A2): k 0.1, V 20, 200 mg over 0.5 h.
  const k = 0.1;
  const V = 20;
  const c = (t: number): number =>
    (400 / (k * V)) * (1 - Math.exp(-k * 0.5)) * Math.exp(-k * (t - 0.5));
  const input = {
    doses: [{ time: 0, amount: 200, duration: 0.5 }],
    levels: [
      { time: 1.5, value: c(1.5) },
      { time: 7.5, value: c(7.5) },
    ],
  };

  it('twoLevelCommand writes {k, V, CL, halfLife}', async () => {
    const io = memoryIo(JSON.stringify(input));
    expect(await twoLevelCommand([], io)).toBe(0);
    const out = JSON.parse(io.out.join('')) as Record<string, number>;
    expect(out.k).toBeCloseTo(0.1, 9);
    expect(out.V).toBeCloseTo(20, 6);
    expect(out.CL).toBeCloseTo(2, 6);
    expect(out.halfLife).toBeCloseTo(Math.LN2 / 0.1, 6);
  });

  it('exits non-zero with the reason when the levels do not allow the method', async () => {
    const io = memoryIo(
      JSON.stringify({
        ...input,
        levels: [
          { time: 0.25, value: 5 },
          { time: 7.5, value: 2 },
        ],
      }),
    );
    expect(await twoLevelCommand([], io)).toBe(2);
    expect(io.err.join('')).toMatch(/during the infusion/);
    expect(() => runTwoLevelCommand({ doses: [], levels: [] })).toThrow(
      /doses must be a non-empty array/,
    );
  });
});

describe('cli dispatcher (tsx src/cli/main.ts)', () => {
  it('`kinetics fit` and `kinetics two-level` run end to end through the registry', async () => {
    const { spawnSync } = await import('node:child_process');
    const run = (cmd: string, stdin: string) =>
      spawnSync('pnpm', ['exec', 'tsx', 'src/cli/main.ts', cmd], {
        input: stdin,
        encoding: 'utf8',
        cwd: new URL('../..', import.meta.url).pathname,
      });
    const fit = run('fit', JSON.stringify(fitInput));
    expect(fit.status).toBe(0);
    expect(Object.keys(JSON.parse(fit.stdout) as object).sort()).toEqual([
      'estimates',
      'objective',
      'predictions',
      'standardErrors',
    ]);
    const bad = run(
      'two-level',
      JSON.stringify({
        doses: [{ time: 0, amount: 200, duration: 0.5 }],
        levels: [{ time: 1, value: 'x' }],
      }),
    );
    expect(bad.status).not.toBe(0);
    expect(bad.stderr).toMatch(/levels\[0\]\.value/);
  }, 60_000);
});
