/**
 * `pnpm kinetics two-level`: Sawchuk-Zaske two-level estimate for a one-compartment infusion regimen.
 * Input (stdin or a file path): {"doses":[{"time":h,"amount":mg,"duration":h}],"levels":[{"time":h,"value":mg/L},{...}]}
 * plus optional "options" (see `TwoLevelOptions`).
 * Output (stdout): {"k":1/h,"V":L,"CL":L/h,"halfLife":h}; warnings to stderr. Levels that do not allow the
 * method exit 2 with every reason; invalid input exits 1 naming the field.
 */
import { EngineError } from '../errors';
import { twoLevelEstimate, type TwoLevelOptions } from '../estimation/two-level';
import { parseCliDoses, readJsonInput, reportFailure, type CliIo } from './fit';

/** The computation behind the command (pure). @throws EngineError for invalid input or `levels-unsuitable`. */
export function runTwoLevelCommand(json: unknown): {
  output: { k: number; V: number; CL: number; halfLife: number };
  warnings: string[];
} {
  if (json == null || typeof json !== 'object')
    throw new EngineError('invalid-input', 'two-level: input must be an object', 'input');
  const input = json as Record<string, unknown>;
  const r = twoLevelEstimate({
    doses: parseCliDoses(input.doses, 'two-level'),
    levels: (Array.isArray(input.levels) ? input.levels : []) as { time: number; value: number }[],
    options: (input.options ?? {}) as Partial<TwoLevelOptions>,
  });
  if (r.outcome === 'refused') {
    throw new EngineError(
      'levels-unsuitable',
      `two-level: the levels do not allow the method: ${r.refusals.map((x) => x.message).join(' ')}`,
      'levels',
    );
  }
  return {
    output: { k: r.k, V: r.V, CL: r.CL, halfLife: r.halfLife },
    warnings: r.warnings.map((w) => `${w.code}: ${w.message}`),
  };
}

/** Command entry: returns the exit code. */
export async function twoLevelCommand(args: readonly string[], io: CliIo): Promise<number> {
  try {
    const { output, warnings } = runTwoLevelCommand(await readJsonInput(args, io, 'two-level'));
    for (const w of warnings) io.stderr(`warning: ${w}\n`);
    io.stdout(`${JSON.stringify(output)}\n`);
    return 0;
  } catch (e) {
    return reportFailure(e, io, e instanceof EngineError && e.code === 'levels-unsuitable' ? 2 : 1);
  }
}
