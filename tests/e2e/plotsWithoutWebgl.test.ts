import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoPassword } from '../../server/db/demo-team';
import { sprinkle } from '../../server/engine/sprinkle';
import { screenshot, startApp, type RunningApp } from './browser';

// Issue 18 §4: the causal-set page's point plot must draw in a browser without WebGL, and no figure
// shows the stock toolbar over its legend. Issue 16: the same page shows the set's manifold-likeness.
let running: RunningApp;
let noWebgl: Browser;

beforeAll(async () => {
  running = await startApp();
  noWebgl = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-webgl', '--disable-3d-apis'],
  });
});
afterAll(async () => {
  await noWebgl?.close();
  await running?.close();
});

describe('plots in a browser without WebGL', () => {
  it('an imported set’s points are drawn as SVG markers, with its manifold-likeness beside them', async () => {
    const page = await noWebgl.newPage({ viewport: { width: 1440, height: 900 } });
    expect(await page.evaluate(() => document.createElement('canvas').getContext('webgl') === null)).toBe(true);
    await page.goto(`${running.baseUrl}/signin`);
    await page.getByLabel('E-mail').fill('tomas.okafor@tacet.example');
    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/runs');

    const { points } = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 400, seed: 'no-webgl', prng: 'arc4' });
    const rows = ['t,x'];
    for (let i = 0; i < points.length; i += 2) rows.push(`${points[i]},${points[i + 1]}`);
    const file = join(mkdtempSync(join(tmpdir(), 'tacet-')), 'diamond400.csv');
    writeFileSync(file, rows.join('\n'));

    await page.goto(`${running.baseUrl}/causal-sets/import`);
    await page.locator('input[type="file"]').setInputFiles(file);
    await page.getByLabel('Name').fill('diamond400 drawn as SVG');
    await page.getByRole('button', { name: 'Import' }).click();
    await page.waitForURL(/\/causal-sets\/[0-9a-f-]{36}$/);

    const figure = page.getByRole('figure', { name: 'Elements' });
    await figure.locator('.scatterlayer .point').first().waitFor();
    expect(await figure.locator('.scatterlayer .point').count()).toBe(400);
    await screenshot(page, 'causal-set-no-webgl');
    expect(await page.getByText(/WebGL/i).allInnerTexts()).toEqual([]);
    expect(await page.locator('.modebar').count()).toBe(0);
    const panel = page.getByTestId('manifold-likeness');
    await panel.waitFor();
    // a 2D diamond's Myrheim–Meyer dimension is near 2 (Myrheim 1978; Meyer 1988): within twice the error shown
    const shown = await panel.locator('tr', { hasText: 'Myrheim–Meyer dimension' }).locator('td').innerText();
    const [, estimate, error] = /^(\d+\.\d+) ± (\d+\.\d+)$/.exec(shown.trim()) ?? [];
    expect(Math.abs(Number(estimate) - 2)).toBeLessThanOrEqual(2 * Number(error));
    await screenshot(page, 'causal-set-no-webgl');
  });
});
