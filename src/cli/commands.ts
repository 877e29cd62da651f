import type { Command } from 'commander';

/** Every command file exports `register<Name>Command(program)`; they are wired up here in menu order. */
export function registerCommands(program: Command): void {
  void program;
}
