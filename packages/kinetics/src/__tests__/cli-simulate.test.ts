import { describe, expect, it } from 'vitest';
import { simulateCommand, runSimulateScenario } from '../cli/simulate';
import { commands } from '../cli/commands';
import type { CliIo } from '../cli/io';

function io(stdin: string): CliIo & { out: string[]; err: string[] } {
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

const scenario = {
  model: { compartments: 1, elimination: 'linear' },
  parameters: { CL: 5, V1: 50 },
  doses: [{ time: 0, amount: 1000, route: 'bolus' }],
  outputTimes: [0, 12],
  aucWindows: [[0, 12]],
};

describe('cli/simulate', () => {
  it('runSimulateScenario(1-cmt bolus) returns concentrations, aucs and errorEstimate', () => {
    // Source: Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1 (one-compartment bolus) — from memory
    const r = runSimulateScenario(scenario);
    expect(r.concentrations[0]).toBe(20);
    expect(r.concentrations[1]).toBeCloseTo(20 * Math.exp(-1.2), 6);
    expect(r.aucs[0]).toBeCloseTo(200 * (1 - Math.exp(-1.2)), 6);
    expect(r.errorEstimate).toBeGreaterThanOrEqual(0);
  });

  it('simulateCommand(stdin JSON) writes one JSON line and exits 0', async () => {
    const x = io(JSON.stringify(scenario));
    expect(await simulateCommand([], x)).toBe(0);
    expect(Object.keys(JSON.parse(x.out.join('')) as object)).toEqual([
      'concentrations',
      'aucs',
      'errorEstimate',
    ]);
  });

  it.each([
    [{ ...scenario, parameters: { CL: '5', V1: 50 } }, 'parameters.CL'],
    [{ ...scenario, parameters: { cl: 5, V1: 50 } }, 'parameters.cl'],
    [{ ...scenario, doses: [{ time: 0, amount: 10, route: 'infusion' }] }, 'doses[0].duration'],
    [{ ...scenario, outputTimes: [1, null] }, 'outputTimes[1]'],
    [{ ...scenario, aucWindows: [[1]] }, 'aucWindows[0]'],
    [{ ...scenario, extra: 1 }, 'extra'],
  ])('simulateCommand(invalid scenario %#) exits 1 naming the field', async (s, field) => {
    const x = io(JSON.stringify(s));
    expect(await simulateCommand([], x)).toBe(1);
    expect(x.err.join('')).toContain(field);
    expect(x.out).toEqual([]);
  });

  it('simulateCommand(not JSON) exits 1', async () => {
    const x = io('{oops');
    expect(await simulateCommand([], x)).toBe(1);
    expect(x.err.join('')).toMatch(/not valid JSON/);
  });

  it('commands registry holds simulate', () => {
    expect(commands.has('simulate')).toBe(true);
  });
});
