/**
 * Registry of `pnpm kinetics <command>` subcommands. Each entry loads its module lazily.
 * To add a command, append one line: commands.set('name', { describe, run: async (a, io) => (await import('./x')).xCommand(a, io) });
 */
import type { CliCommand } from './io';

export const commands = new Map<string, CliCommand>();

commands.set('simulate', {
  describe:
    'simulate one scenario (JSON on stdin) → concentrations, AUCs, error estimate (JSON on stdout)',
  run: async (a, io) => (await import('./simulate')).simulateCommand(a, io),
});
commands.set('fit', {
  describe: 'Bayesian MAP fit (JSON on stdin)',
  run: async (a, io) => (await import('./fit')).fitCommand(a, io),
});
commands.set('two-level', {
  describe: 'two-level (Sawchuk-Zaske) estimate (JSON on stdin)',
  run: async (a, io) => (await import('./two-level')).twoLevelCommand(a, io),
});
