/**
 * `pnpm kinetics fit`: Bayesian MAP fit from JSON on stdin (or a file path argument).
 * Input: {"model":{"compartments":1|2,"elimination":"linear"|"michaelis-menten"},"typical":{"CL":..,"V1":..},
 *   "variability":{"CL":omega,...},"residualError":{"additive":mg/L,"proportional":fraction},
 *   "doses":[{"time":h,"amount":mg,"route":"infusion","duration":h}],"levels":[{"time":h,"value":mg/L}]}
 * (omega = SD of ln parameter; a parameter without variability is fixed at its typical value).
 * Output (stdout): {"estimates":{...},"standardErrors":{...},"predictions":[mg/L per level],"objective":number};
 * warnings go to stderr. Invalid input exits non-zero with a message naming the field.
 */
import { EngineError } from '../errors';
import { fitMap } from '../estimation/map-fit';
import type { Dose, ModelStructure } from '../types';
import { readFileSync } from 'node:fs';
import type { CliIo } from './io';

export type { CliIo };

/** JSON from the first non-flag argument (a file path) or stdin. @throws EngineError `invalid-input` on bad JSON. */
export async function readJsonInput(
  args: readonly string[],
  io: CliIo,
  command: string,
): Promise<unknown> {
  const file = args.find((a) => !a.startsWith('-'));
  const text = file ? readFileSync(file, 'utf8') : await io.readStdin();
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw new EngineError(
      'invalid-input',
      `${command}: input is not valid JSON (${(e as Error).message})`,
      'input',
    );
  }
}

/** Print an error (naming the field when known) and return the exit code. */
export function reportFailure(e: unknown, io: CliIo, code = 1): number {
  if (e instanceof EngineError) {
    io.stderr(`error: ${e.message}${e.field ? ` [field: ${e.field}]` : ''}\n`);
    return code;
  }
  io.stderr(`error: ${e instanceof Error ? e.message : String(e)}\n`);
  return 1;
}

function asObject(v: unknown, field: string): Record<string, unknown> {
  if (v == null || typeof v !== 'object' || Array.isArray(v)) {
    throw new EngineError('invalid-input', `fit: ${field} must be an object`, field);
  }
  return v as Record<string, unknown>;
}

/** Normalise CLI doses: `route` defaults to "infusion" when a duration > 0 is given, else "bolus". */
export function parseCliDoses(v: unknown, command: string): Dose[] {
  if (!Array.isArray(v) || v.length === 0)
    throw new EngineError('invalid-input', `${command}: doses must be a non-empty array`, 'doses');
  return v.map((d, i) => {
    const o = d as Record<string, unknown>;
    if (o == null || typeof o !== 'object')
      throw new EngineError(
        'invalid-input',
        `${command}: doses[${i}] must be an object`,
        `doses[${i}]`,
      );
    const duration = o.duration as number | undefined;
    const route =
      (o.route as Dose['route'] | undefined) ??
      (typeof duration === 'number' && duration > 0 ? 'infusion' : 'bolus');
    return { ...(o as object), route } as Dose;
  });
}

/** The fit computation behind the command (pure). @throws EngineError naming the field. */
export function runFitCommand(json: unknown): {
  output: {
    estimates: Record<string, number>;
    standardErrors: Record<string, number>;
    predictions: number[];
    objective: number;
  };
  warnings: string[];
} {
  const input = asObject(json, 'input');
  const model = asObject(input.model, 'model') as unknown as ModelStructure;
  const r = fitMap({
    model,
    prior: {
      typical: asObject(input.typical, 'typical') as Record<string, number>,
      variability: (input.variability === undefined
        ? {}
        : asObject(input.variability, 'variability')) as Record<string, number>,
      residualError: asObject(input.residualError, 'residualError') as {
        additive: number;
        proportional: number;
      },
    },
    doses: parseCliDoses(input.doses, 'fit'),
    levels: (Array.isArray(input.levels) ? input.levels : []) as { time: number; value: number }[],
  });
  return {
    output: {
      estimates: r.estimates,
      standardErrors: r.standardErrors ?? {},
      predictions: r.levels.map((l) => l.individual),
      objective: r.objective,
    },
    warnings: r.warnings.map((w) => `${w.code}: ${w.message}`),
  };
}

/** Command entry: returns the exit code. */
export async function fitCommand(args: readonly string[], io: CliIo): Promise<number> {
  try {
    const { output, warnings } = runFitCommand(await readJsonInput(args, io, 'fit'));
    for (const w of warnings) io.stderr(`warning: ${w}\n`);
    io.stdout(`${JSON.stringify(output)}\n`);
    return 0;
  } catch (e) {
    return reportFailure(e, io);
  }
}
