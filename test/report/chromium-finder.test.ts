/**
 * The browser tests' Chromium: system `chromium` on PATH first (so hiding it
 * from PATH hides it), else the binary inside the @sparticuz/chromium package.
 */
import { chmodSync, mkdirSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { delimiter, join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { BROWSER_TIMEOUT_MS, chromiumOnPath, launchChromium, packagedChromium } from '../helpers/chromium.js';

describe('finding a Chromium', () => {
  const dir = mkdtempSync(join(tmpdir(), 'gapstack-fake-path-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  test('a chromium on PATH is found by walking PATH; a PATH without one finds none', () => {
    const empty = join(dir, 'empty');
    const withOne = join(dir, 'bin');
    for (const d of [empty, withOne]) rmSync(d, { recursive: true, force: true });
    for (const d of [empty, withOne]) mkdirSync(d);
    const fake = join(withOne, 'chromium');
    writeFileSync(fake, '#!/bin/sh\nexit 0\n');
    chmodSync(fake, 0o755);
    expect(chromiumOnPath([empty, withOne].join(delimiter))).toBe(fake);
    expect(chromiumOnPath(empty)).toBeUndefined();
    // No execute bit (even root needs one): not a browser.
    chmodSync(fake, 0o644);
    expect(chromiumOnPath(withOne)).toBeUndefined();
  });

  test('the packaged Chromium unpacks to an executable file and launches headless', async () => {
    const found = await packagedChromium();
    expect(found.source).toBe('npm');
    expect(statSync(found.executablePath).isFile()).toBe(true);
    const { ctx } = await launchChromium({ found });
    const page = await ctx.newPage();
    await page.setContent('<p id="x">gapstack</p>');
    expect(await page.textContent('#x')).toBe('gapstack');
    await ctx.close();
  }, BROWSER_TIMEOUT_MS);
});
