import { Command } from 'commander';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { registerCheckCommand } from '../../src/cli/check.js';
import { UserError } from '../../src/errors.js';

/** Run `clipbench check ...args` in-process and return what it wrote to stdout. */
async function runCheck(...args: string[]): Promise<string> {
  const program = new Command().exitOverride();
  registerCheckCommand(program);
  let stdout = '';
  const spy = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => {
    stdout += String(chunk);
    return true;
  });
  try {
    await program.parseAsync(['node', 'clipbench', 'check', ...args]);
  } finally {
    spy.mockRestore();
  }
  return stdout;
}

afterEach(() => vi.restoreAllMocks());

describe('clipbench check', () => {
  test('--json prints { facts, warnings, operatingPoint } with code, stage, message', async () => {
    const json = JSON.parse(await runCheck('fixtures/designs/night-drive.json', '--json', '--set', 'clip.diode=led-red', '--set', 'clip.up=3', '--set', 'clip.down=3')) as {
      facts: { code: string; stage: string; text: string }[];
      warnings: { code: string; stage: string; message: string }[];
    };
    expect(Object.keys(json).sort()).toEqual(['facts', 'operatingPoint', 'warnings']);
    expect(json.facts.some((f) => f.code === 'gbw-bandwidth' && f.stage === 'amp')).toBe(true);
    expect(json.warnings.length).toBeGreaterThan(0);
    for (const warning of json.warnings) expect(Object.keys(warning).sort()).toEqual(['code', 'message', 'stage']);
    expect(json.warnings.some((w) => w.code === 'rails-before-diodes' && w.stage === 'amp')).toBe(true);
  });

  test('--input-peak changes the worst input: 10 mV at full drive (1.1 V) stays inside the 3 V swing', async () => {
    const json = JSON.parse(await runCheck('fixtures/designs/night-drive.json', '--json', '--input-peak', '0.01')) as { warnings: unknown[] };
    expect(json.warnings).toEqual([]);
  });

  test('terminal table shows facts, warnings and cautions', async () => {
    const text = await runCheck('fixtures/designs/night-drive.json', '--set', 'clip.diode=led-red', '--set', 'clip.up=3', '--set', 'clip.down=3');
    expect(text).toMatch(/^Design check: night-drive/);
    expect(text).toContain('GBW-limited bandwidth at maximum gain');
    expect(text).toContain('[rails-before-diodes] amp:');
    expect(text).toMatch(/Cautions:\n {2}- Rendered drive can be loud/);
  });

  test('a design that cannot be read, or a bad --input-peak, is a UserError', async () => {
    await expect(runCheck('fixtures/designs/missing.json')).rejects.toThrow(UserError);
    await expect(runCheck('fixtures/designs/night-drive.json', '--input-peak', 'loud')).rejects.toThrow(
      '--input-peak: "loud" is not a voltage (expected volts, e.g. 9, 9V or 1.5)',
    );
  });
});
