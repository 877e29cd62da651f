#!/usr/bin/env node
/**
 * clipbench command line. Each command lives in its own file and registers itself here; this file
 * only wires them up and turns user errors into one clear line and a non-zero exit.
 */
import { Command, CommanderError } from 'commander';
import { UserError } from '../errors.js';
import { registerCommands } from './commands.js';
import { removeOwnTemporaryFiles } from '../audio/atomicWrite.js';
import { releaseAllLocks } from '../audio/folderLock.js';

const program = new Command();
program
  .name('clipbench')
  .description('Render dry DI takes through a model of a drive circuit, and measure it.')
  .option('--debug', 'show stack traces for errors')
  // Usage errors are one line like every other error: "clipbench: <problem> (run ... --help)".
  .configureOutput({ outputError: (text, write) => write(`clipbench: ${text.trim().replace(/^error: /, '')} (run with --help for usage)\n`) })
  .exitOverride();

registerCommands(program);

// A closed pipe (`clipbench parts | head -1`) or a full disk behind stdout ends the run quietly:
// exit 1, no stack trace.
process.stdout.on('error', (error: NodeJS.ErrnoException) => {
  if (error.code === 'EPIPE' || error.code === 'ENOSPC') process.exit(1);
  throw error;
});

// An interrupted run leaves no half-written files: ours are removed (render workers share our pid).
for (const [signal, status] of [['SIGINT', 130], ['SIGTERM', 143]] as const) {
  process.on(signal, () => {
    removeOwnTemporaryFiles();
    releaseAllLocks();
    process.exit(status);
  });
}

function reportFailure(error: unknown): never {
  const debug = process.argv.includes('--debug');
  if (error instanceof CommanderError) {
    // Help and version exit 0; a usage error exits 2, as a bad value does.
    process.exit(error.exitCode === 0 ? 0 : 2);
  }
  if (error instanceof UserError) {
    process.stderr.write(`clipbench: ${error.message}\n`);
    if (debug && error.stack) process.stderr.write(`${error.stack}\n`);
    process.exit(2);
  }
  const message = error instanceof Error ? error.message : String(error);
  process.stderr.write(`clipbench: internal error: ${message} (run with --debug for details)\n`);
  if (debug && error instanceof Error && error.stack) process.stderr.write(`${error.stack}\n`);
  process.exit(70);
}

try {
  await program.parseAsync(process.argv);
} catch (error) {
  reportFailure(error);
}
