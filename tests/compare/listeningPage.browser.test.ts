/**
 * Drives the real listening page in headless Chromium (Debian's `chromium`, installed by .ci/run):
 * opened from disk, every player loads, switching keeps the position, a short blind session is
 * answered through the page's buttons and its score read back. Hostile labels must stay text.
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';
import { runCompare, type CompareResult } from '../../src/compare/runCompare.js';
import { readVariantsFile } from '../../src/compare/variants.js';
import { expectClose } from '../helpers/expectClose.js';
import { makeTempDir, NIGHT_DRIVE, writeDemoTake } from './compareFixtures.js';

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium) console.warn(`listening page browser test skipped: ${CHROMIUM} not found (apt-get install chromium)`);

const HOSTILE = '<script>alert(1)</script>';
const TAKE_SECONDS = 1.5;

/** The page's test view of a take (window.clipbenchPage), as far as these tests read it. */
interface PageTake {
  active: string;
}
declare const window: { clipbenchPage: { takes: PageTake[] } };
declare const document: {
  querySelectorAll(selector: string): ArrayLike<{ dataset: Record<string, string>; muted: boolean; currentTime: number; readyState: number; duration: number; textContent: string }>;
  dispatchEvent(event: unknown): boolean;
};
declare const KeyboardEvent: new (type: string, init: { key: string }) => unknown;

let dir: string;
let out: string;
let result: CompareResult;
let browser: Browser;
let page: Page;
const dialogs: string[] = [];
const pageErrors: string[] = [];
const networkRequests: string[] = [];

beforeAll(async () => {
  if (!haveChromium) return;
  dir = makeTempDir('listen');
  out = path.join(dir, 'out');
  const take = await writeDemoTake(dir, 'take.wav', TAKE_SECONDS);
  const variantsFile = path.join(dir, 'variants.json');
  writeFileSync(
    variantsFile,
    JSON.stringify({
      variants: [
        { label: HOSTILE, set: { 'clip.diode': '1n4148' } },
        { label: '../../x', set: { 'clip.diode': '1n34a' } },
      ],
    }),
  );
  result = await runCompare({
    designPath: NIGHT_DRIVE,
    inputPaths: [take],
    outputDir: out,
    variants: await readVariantsFile(variantsFile),
    commonOverrides: [],
    match: { targetLufs: -18, ceilingDbfs: -1 },
    oversample: 2,
    scale: { fullScaleVolts: 1 },
    bits: '16',
    dither: true,
    threads: 1,
  });
  browser = await chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--autoplay-policy=no-user-gesture-required'],
  });
  page = await browser.newPage();
  page.on('dialog', (dialog) => {
    dialogs.push(dialog.message());
    void dialog.dismiss();
  });
  page.on('pageerror', (error) => pageErrors.push(error.message));
  page.on('request', (request) => {
    if (!request.url().startsWith('file:')) networkRequests.push(request.url());
  });
  // #seed makes the blind trials repeatable; the answers below do not depend on it.
  await page.goto(`${pathToFileURL(result.pagePath).href}#seed=4242`);
});

afterAll(async () => {
  await browser?.close();
});

describe.skipIf(!haveChromium)('listening page in Chromium', () => {
  it('keeps hostile labels out of file names and out of the markup', () => {
    const names = readdirSync(out);
    for (const name of names) expect(name).toMatch(/^[A-Za-z0-9][A-Za-z0-9._-]*$/);
    expect(names.some((name) => name.includes('..'))).toBe(false);
    expect(existsSync(path.join(dir, 'x.wav'))).toBe(false);
    const html = readFileSync(result.pagePath, 'utf8');
    expect(html).not.toContain(HOSTILE);
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(html.match(/<script>/g)).toHaveLength(1);
  });

  it('loads every player from disk with no network, and shows labels as text', async () => {
    await page.waitForFunction(() => Array.from(document.querySelectorAll('audio')).every((a) => a.readyState >= 1), null, { timeout: 15_000 });
    const players = await page.evaluate(() => Array.from(document.querySelectorAll('audio')).map((a) => ({ key: a.dataset.key, duration: a.duration })));
    expect(players.map((p) => p.key)).toEqual(['0', '1', '2']);
    for (const player of players) expectClose(player.duration, TAKE_SECONDS, { atol: 0.01 });
    const buttons = await page.evaluate(() => Array.from(document.querySelectorAll('button.choice')).map((b) => b.textContent));
    expect(buttons).toEqual(['0dry', `1${HOSTILE}`, '2../../x']);
    expect(dialogs).toEqual([]);
    expect(pageErrors).toEqual([]);
    expect(networkRequests).toEqual([]);
  });

  it('switches players instantly at the same playback position', async () => {
    await page.click('section.take [data-action=play]');
    await page.waitForTimeout(600);
    const switched = await page.evaluate(() => {
      const audios = Array.from(document.querySelectorAll('audio'));
      const before = audios.find((a) => !a.muted);
      const positionBefore = before ? before.currentTime : NaN;
      document.dispatchEvent(new KeyboardEvent('keydown', { key: '2' }));
      const after = audios.filter((a) => !a.muted);
      return {
        positionBefore,
        unmuted: after.map((a) => a.dataset.key),
        positionAfter: after[0] ? after[0].currentTime : NaN,
        active: window.clipbenchPage.takes[0].active,
      };
    });
    expect(switched.active).toBe('2');
    expect(switched.unmuted).toEqual(['2']);
    expect(switched.positionBefore).toBeGreaterThan(0.2);
    expectClose(switched.positionAfter, switched.positionBefore, { atol: 0.06 });
  });

  it('runs a blind session through the buttons and reports score, p-value and labels', async () => {
    await page.selectOption('[data-role=pick-1]', '1');
    await page.selectOption('[data-role=pick-2]', '2');
    await page.fill('[data-role=trials]', '5');
    await page.click('[data-action=blind-start]');
    const activeKey = (): Promise<string> => page.evaluate(() => window.clipbenchPage.takes[0].active);
    for (let trial = 0; trial < 5; trial++) {
      await page.click('[data-listen=a]');
      const a = await activeKey();
      await page.click('[data-listen=x]');
      const x = await activeKey();
      const xIsA = x === a;
      const answerRight = trial < 3;
      await page.click(`[data-answer=${xIsA === answerRight ? 'a' : 'b'}]`);
    }
    const shown = await page.evaluate(() => {
      const data = Array.from(document.querySelectorAll('[data-role=blind-result]'))[0].dataset;
      const text = (role: string) => Array.from(document.querySelectorAll(`[data-role=${role}]`))[0].textContent;
      return { correct: data.correct, trials: data.trials, p: data.p, score: text('score'), revealA: text('reveal-a'), revealB: text('reveal-b'), items: document.querySelectorAll('[data-role=trials-list] li').length };
    });
    expect(shown.correct).toBe('3');
    expect(shown.trials).toBe('5');
    expect(shown.score).toBe('3 of 5 correct');
    // Binomial distribution, textbook: P(K >= 3 | n = 5, p = 1/2) = (C(5,3) + C(5,4) + C(5,5)) / 32 = 16/32.
    expectClose(Number(shown.p), 16 / 32, { rtol: 1e-12 });
    expect([shown.revealA, shown.revealB].sort()).toEqual([`1. ${HOSTILE}`, '2. ../../x'].sort());
    expect(shown.items).toBe(5);
    expect(dialogs).toEqual([]);
    expect(pageErrors).toEqual([]);
  });
});
