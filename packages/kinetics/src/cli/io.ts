/**
 * Shared CLI plumbing: where a command reads and writes, and the command shape the registry holds.
 * Structurally identical to the `CliIo` in fit.ts, so every command takes the same `(args, io)`.
 */
import { EngineError } from '../errors';

export interface CliIo {
  readonly readStdin: () => Promise<string>;
  readonly stdout: (s: string) => void;
  readonly stderr: (s: string) => void;
}

/** A subcommand: a one-line description and a runner returning the exit code. */
export interface CliCommand {
  readonly describe: string;
  readonly run: (args: readonly string[], io: CliIo) => Promise<number>;
}

/** Process stdio. */
export const stdio: CliIo = {
  readStdin: async () => {
    const chunks: Buffer[] = [];
    for await (const c of process.stdin) chunks.push(c as Buffer);
    return Buffer.concat(chunks).toString('utf8');
  },
  stdout: (s) => void process.stdout.write(s),
  stderr: (s) => void process.stderr.write(s),
};

/** Print a failure (EngineError messages name the field) and return the exit code. */
export function failure(command: string, e: unknown, io: CliIo): number {
  if (e instanceof EngineError) {
    io.stderr(`kinetics ${command}: ${e.message}${e.field ? ` [field: ${e.field}]` : ''}\n`);
    return 1;
  }
  io.stderr(`kinetics ${command}: ${e instanceof Error ? e.message : String(e)}\n`);
  return 1;
}
