import { spawn, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/** The compiled CLI; `npm test` builds it first (pretest). */
export const CLI_PATH = fileURLToPath(new URL('../../dist/cli/main.js', import.meta.url));
export const PROJECT_ROOT = fileURLToPath(new URL('../../', import.meta.url));

export interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

export function runCli(args: string[], cwd = PROJECT_ROOT): CliResult {
  const result = spawnSync(process.execPath, [CLI_PATH, ...args], { cwd, encoding: 'utf8', timeout: 120_000 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/**
 * `runCli` without blocking: lets `describe.concurrent` tests run several CLI processes at once
 * (each spends most of its time starting up).
 */
export function runCliAsync(args: string[], cwd = PROJECT_ROOT): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [CLI_PATH, ...args], { cwd, timeout: 120_000 });
    let stdout = '';
    let stderr = '';
    child.stdout.setEncoding('utf8').on('data', (text: string) => (stdout += text));
    child.stderr.setEncoding('utf8').on('data', (text: string) => (stderr += text));
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}
