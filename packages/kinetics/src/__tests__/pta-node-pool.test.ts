import { describe, expect, it } from 'vitest';
import { createPtaPool, probabilityOfTargetAttainmentInPool } from '../node';
import { probabilityOfTargetAttainment, type PtaInput } from '../pta/pta';

const input: PtaInput = {
  model: { compartments: 2, elimination: 'linear' },
  source: {
    kind: 'population',
    prior: { typical: { CL: 4, V1: 30, Q: 6, V2: 40 }, variability: { CL: 0.3, V1: 0.25 } },
  },
  regimens: [
    { amount: 1000, interval: 12, infusionDuration: 1 },
    { amount: 1500, interval: 24, infusionDuration: 1.5 },
  ],
  target: { auc24: { min: 400, max: 600 }, trough: { max: 20 } },
  n: 3000,
  seed: 11,
};

describe('pta/node-pool', () => {
  it('probabilityOfTargetAttainmentInPool(input, {workers: 2}) gives exactly the single-thread answer', async () => {
    const serial = probabilityOfTargetAttainment(input);
    const pooled = await probabilityOfTargetAttainmentInPool(input, { workers: 2, chunks: 5 });
    expect(pooled.regimens).toEqual(serial.regimens);
    expect(pooled.counters.virtualPatients).toBe(3000);
  }, 30_000);

  it('a reusable pool runs twice and rejects bad input before sending work', async () => {
    const pool = createPtaPool({ workers: 2 });
    try {
      const a = await pool.run(input);
      const b = await pool.run({ ...input, seed: 12 });
      expect(a.regimens[0]!.attained).not.toBe(b.regimens[0]!.attained);
      await expect(pool.run({ ...input, n: -1 })).rejects.toThrow(/n must be a positive integer/);
    } finally {
      await pool.close();
    }
  }, 30_000);
});
