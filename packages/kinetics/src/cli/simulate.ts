/**
 * `pnpm kinetics simulate`: one scenario as JSON on stdin → JSON on stdout.
 * Input:  {"model":{"compartments":1|2,"elimination":"linear"|"michaelis-menten"},
 *          "parameters":{"CL":L/h,"V1":L,"Q":L/h,"V2":L,"ka":1/h,"F":fraction,"tlag":h,"Vmax":mg/h,"Km":mg/L},
 *          "doses":[{"time":h,"amount":mg,"route":"bolus"|"infusion"|"oral","duration":h}],
 *          "outputTimes":[h,...],"aucWindows":[[from,to],...]}      (unused parameters may be omitted)
 * Output: {"concentrations":[mg/L,...],"aucs":[mg·h/L,...],"errorEstimate":mg/L}
 * Invalid scenarios exit 1 with a message naming the bad field.
 */
import { EngineError } from '../errors';
import { simulate, type SimulateInput } from '../simulate';
import type { Dose, PkParameters } from '../types';
import { failure, type CliIo } from './io';

const PARAMETER_NAMES = new Set(['CL', 'V1', 'Q', 'V2', 'ka', 'F', 'tlag', 'Vmax', 'Km']);
const SCENARIO_KEYS = new Set([
  'model',
  'parameters',
  'doses',
  'outputTimes',
  'aucWindows',
  'options',
]);

const bad = (field: string, message: string): never => {
  throw new EngineError('invalid-input', `${field} ${message}`, field);
};
const isObj = (v: unknown): v is Record<string, unknown> =>
  v != null && typeof v === 'object' && !Array.isArray(v);

/**
 * Check the JSON shape of a scenario (types and unknown keys; the engine checks values) and build the
 * `simulate` input. @throws {EngineError} `invalid-input` naming the field.
 */
export function parseScenario(json: unknown): SimulateInput {
  if (!isObj(json)) return bad('scenario', 'must be a JSON object');
  for (const k of Object.keys(json)) if (!SCENARIO_KEYS.has(k)) bad(k, 'is not a scenario field');
  if (!isObj(json.model)) bad('model', 'must be an object');
  if (!isObj(json.parameters)) bad('parameters', 'must be an object');
  const params = json.parameters as Record<string, unknown>;
  for (const [k, v] of Object.entries(params)) {
    if (!PARAMETER_NAMES.has(k))
      bad(`parameters.${k}`, `is not a parameter (use ${[...PARAMETER_NAMES].join(', ')})`);
    if (typeof v !== 'number') bad(`parameters.${k}`, 'must be a number');
  }
  if (!Array.isArray(json.doses)) bad('doses', 'must be an array');
  if (!Array.isArray(json.outputTimes)) bad('outputTimes', 'must be an array');
  (json.outputTimes as unknown[]).forEach((t, i) => {
    if (typeof t !== 'number') bad(`outputTimes[${i}]`, 'must be a number');
  });
  if (json.aucWindows !== undefined) {
    if (!Array.isArray(json.aucWindows)) bad('aucWindows', 'must be an array of [from, to]');
    (json.aucWindows as unknown[]).forEach((w, i) => {
      if (
        !Array.isArray(w) ||
        w.length !== 2 ||
        typeof w[0] !== 'number' ||
        typeof w[1] !== 'number'
      ) {
        bad(`aucWindows[${i}]`, 'must be [from, to] with two numbers');
      }
    });
  }
  if (json.options !== undefined && !isObj(json.options)) bad('options', 'must be an object');
  return {
    model: json.model as unknown as SimulateInput['model'],
    parameters: params as unknown as PkParameters,
    doses: json.doses as Dose[],
    outputTimes: json.outputTimes as number[],
    aucWindows: (json.aucWindows ?? []) as [number, number][],
    options: (json.options ?? {}) as SimulateInput['options'],
  };
}

/** Run one scenario: the CLI's output record. @throws {EngineError} for invalid scenarios. */
export function runSimulateScenario(json: unknown): {
  concentrations: number[];
  aucs: number[];
  errorEstimate: number;
} {
  const r = simulate(parseScenario(json));
  return { concentrations: r.concentrations, aucs: r.aucs, errorEstimate: r.errorEstimate ?? 0 };
}

export async function simulateCommand(_args: readonly string[], io: CliIo): Promise<number> {
  let json: unknown;
  try {
    json = JSON.parse(await io.readStdin());
  } catch (e) {
    return failure(
      'simulate',
      new EngineError('invalid-input', `stdin is not valid JSON: ${(e as Error).message}`, 'stdin'),
      io,
    );
  }
  try {
    io.stdout(`${JSON.stringify(runSimulateScenario(json))}\n`);
    return 0;
  } catch (e) {
    return failure('simulate', e, io);
  }
}
