/**
 * Node worker-thread pool for `probabilityOfTargetAttainment`, so a large Monte Carlo run does not block
 * the event loop. Patients [0, n) are split into contiguous chunks (`ptaChunks`); each chunk runs the pure core
 * in a worker with the same master seed; chunks are merged with `mergePtaResults`. Because every virtual patient
 * draws from its own stream (`streamSeed(seed, i)`), the answer is identical to the unchunked run for any number
 * of workers or chunks.
 * This module is Node-only and is exported from `@ebbtide/kinetics/node`, never from the main entry.
 * The same file is the worker's entry: loaded in a worker with `workerData.ebbtidePta`, it serves chunk requests.
 */
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { EngineError } from '../errors';
import {
  mergePtaResults,
  probabilityOfTargetAttainment,
  ptaChunks,
  type PtaInput,
  type PtaResult,
} from './pta';

export interface PtaPoolOptions {
  /** Worker threads (default: available parallelism, at most 8). */
  readonly workers: number;
  /** Chunks (default: 4 per worker, for load balance). */
  readonly chunks: number;
}

type ChunkRequest = { readonly id: number; readonly input: PtaInput };
type ChunkReply = {
  readonly id: number;
  readonly result?: PtaResult;
  readonly error?: { code: string; message: string; field?: string };
};

const MARK = 'ebbtidePta';

if (
  !isMainThread &&
  parentPort &&
  (workerData as Record<string, unknown> | null)?.[MARK] === true
) {
  const port = parentPort;
  port.on('message', (msg: ChunkRequest) => {
    try {
      port.postMessage({
        id: msg.id,
        result: probabilityOfTargetAttainment(msg.input),
      } satisfies ChunkReply);
    } catch (e) {
      const err =
        e instanceof EngineError
          ? { code: e.code, message: e.message, field: e.field }
          : { code: 'worker-error', message: String(e) };
      port.postMessage({ id: msg.id, error: err } satisfies ChunkReply);
    }
  });
}

/**
 * Start one worker on this file. From compiled JavaScript the file is loaded directly. From TypeScript source
 * (tsx, vitest) the worker first registers tsx's ESM loader in its own thread (tsx/esm/api `register`), because
 * loader hooks of the parent thread do not reach workers on Node 20.
 */
function startWorker(): Worker {
  const self = import.meta.url;
  const workerOptions = { workerData: { [MARK]: true } };
  if (!self.endsWith('.ts')) return new Worker(new URL(self), workerOptions);
  // The ESM build of tsx/esm/api, located from the package's own manifest.
  const manifest = createRequire(self).resolve('tsx/package.json');
  const api = pathToFileURL(join(dirname(manifest), 'dist/esm/api/index.mjs')).href;
  const code = `import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(self)}); });`;
  return new Worker(code, { ...workerOptions, eval: true });
}

/** A reusable pool: start-up (≈ tens of ms per worker from JS, longer from TS source) is paid once. */
export interface PtaPool {
  readonly workers: number;
  /** Same answer as `probabilityOfTargetAttainment(input)`; chunks default to 4 per worker. */
  run(input: PtaInput, chunks?: number): Promise<PtaResult>;
  /** Terminate the workers. */
  close(): Promise<void>;
}

/**
 * Start a pool of PTA worker threads.
 * @example const pool = createPtaPool({ workers: 2 }); const r = await pool.run(input); await pool.close();
 */
export function createPtaPool(options: Partial<Pick<PtaPoolOptions, 'workers'>> = {}): PtaPool {
  const size = Math.max(1, Math.floor(options.workers ?? Math.min(8, availableParallelism())));
  const pool = Array.from({ length: size }, () => startWorker());
  let nextId = 0;
  const pending = new Map<
    number,
    { resolve: (r: PtaResult) => void; reject: (e: Error) => void }
  >();
  for (const w of pool) {
    w.on('message', (msg: ChunkReply) => {
      const p = pending.get(msg.id);
      if (!p) return;
      pending.delete(msg.id);
      if (msg.error) p.reject(new EngineError(msg.error.code, msg.error.message, msg.error.field));
      else p.resolve(msg.result!);
    });
    w.on('error', (e) => {
      for (const [id, p] of pending) {
        pending.delete(id);
        p.reject(new EngineError('worker-error', `PTA worker failed: ${String(e)}`));
      }
    });
  }
  const runChunk = (w: Worker, input: PtaInput): Promise<PtaResult> =>
    new Promise((resolve, reject) => {
      const id = nextId++;
      pending.set(id, { resolve, reject });
      w.postMessage({ id, input } satisfies ChunkRequest);
    });
  return {
    workers: size,
    async run(input: PtaInput, chunks?: number): Promise<PtaResult> {
      // Validate in the caller's thread (one patient, cheap) so bad input fails before any chunk is sent.
      probabilityOfTargetAttainment({ ...input, range: [0, Math.min(1, input?.n ?? 0)] });
      const ranges = ptaChunks(input.n, chunks ?? size * 4);
      let next = 0;
      const results: PtaResult[] = [];
      await Promise.all(
        pool.map(async (w) => {
          while (next < ranges.length) {
            const range = ranges[next++]!;
            results.push(await runChunk(w, { ...input, range }));
          }
        }),
      );
      return mergePtaResults(results);
    },
    async close(): Promise<void> {
      await Promise.all(pool.map((w) => w.terminate()));
    },
  };
}

/**
 * Run PTA once in a fresh pool of worker threads (started and closed here); resolves to exactly
 * `probabilityOfTargetAttainment(input)` (counters summed over chunks). For repeated runs use `createPtaPool`.
 * @throws EngineError as the core (validated in the calling thread first), or `worker-error`.
 * @example await probabilityOfTargetAttainmentInPool(input, { workers: 2 }) // => same as probabilityOfTargetAttainment(input)
 */
export async function probabilityOfTargetAttainmentInPool(
  input: PtaInput,
  options: Partial<PtaPoolOptions> = {},
): Promise<PtaResult> {
  const pool = createPtaPool(options);
  try {
    return await pool.run(input, options.chunks);
  } finally {
    await pool.close();
  }
}
