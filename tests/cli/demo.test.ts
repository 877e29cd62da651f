import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { PROJECT_ROOT, runCli } from '../helpers/cli.js';

describe('clipbench demo', () => {
  it('writes the dry take and one render per bundled design, and prints the table and the caution', () => {
    const out = mkdtempSync(path.join(tmpdir(), 'clipbench-demo-'));
    const result = runCli(['demo', '-o', out, '--oversample', '2']);
    expect(result.status).toBe(0);
    const designs = readdirSync(path.join(PROJECT_ROOT, 'fixtures', 'designs')).filter((name) => name.endsWith('.json'));
    const files = readdirSync(out);
    expect(files).toContain('demo-take.wav');
    for (const design of designs) expect(files).toContain(`demo-take--${design.replace(/\.json$/, '')}.wav`);
    expect(result.stdout).toMatch(/in peak V/);
    expect(result.stdout).toMatch(/low volume/);
  });
});
