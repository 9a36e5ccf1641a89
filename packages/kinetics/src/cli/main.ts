/**
 * Entry point of `pnpm kinetics <command> [...args]`: dispatches to the registry in commands.ts.
 * Exit codes: 0 success, 1 invalid input or failure, 2 unknown command / usage.
 */
import { commands } from './commands';
import { stdio } from './io';

async function main(argv: readonly string[]): Promise<number> {
  const [name, ...args] = argv;
  const command = name === undefined ? undefined : commands.get(name);
  if (!command) {
    const list = [...commands].map(([n, c]) => `  ${n.padEnd(10)} ${c.describe}`).join('\n');
    stdio.stderr(
      `${name === undefined ? 'kinetics: no command given' : `kinetics: unknown command "${name}"`}\nusage: pnpm kinetics <command>\n${list}\n`,
    );
    return 2;
  }
  return command.run(args, stdio);
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`kinetics: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`);
    process.exitCode = 1;
  },
);
