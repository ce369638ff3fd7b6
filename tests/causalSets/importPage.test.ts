import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoPassword } from '../../server/db/demo-team';
import { screenshotDir, startApp, type RunningApp } from '../e2e/browser';

/** The import page in a real browser: pick a file, fill the metadata, see problems by row, preview the set. */
const researcher = 'tomas.okafor@tacet.example';
const viewer = 'mira.castellanos@tacet.example';
const fixture = join(import.meta.dirname, '..', '..', 'fixtures', 'diamond300.csv');

async function signIn(page: Page, baseUrl: string, email: string, then: string): Promise<void> {
  await page.goto(`${baseUrl}${then}`);
  await page.waitForURL('**/signin**');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(`**${then}`);
}

const shot = (page: Page, name: string) => page.screenshot({ path: join(screenshotDir, `causal-sets-${name}.png`), fullPage: true });

describe('importing a causal set in the browser', () => {
  let running: RunningApp;

  beforeAll(async () => {
    running = await startApp();
  });
  afterAll(async () => {
    await running?.close();
  });

  it('a researcher imports a CSV, sees the problems of a bad one by row, and previews a good one', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 900 } });
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await signIn(page, running.baseUrl, researcher, '/causal-sets');
    await page.getByText('No imported causal sets yet.').waitFor();
    await page.getByRole('navigation').getByRole('link', { name: 'Causal sets' }).waitFor();

    await page.getByRole('link', { name: 'Import', exact: true }).click();
    await page.waitForURL('**/causal-sets/import');
    // a file with a bad row: the server names the row and column and nothing is stored
    await page.getByLabel('CSV file').setInputFiles({ name: 'broken.csv', mimeType: 'text/csv', buffer: Buffer.from('t,x\n0,0\n0.2,oops\n0.3,0.1,0.4\n') });
    await expect.poll(() => page.getByLabel('Name').inputValue()).toBe('broken');
    await page.getByRole('button', { name: 'Import', exact: true }).click();
    const problems = page.getByRole('list', { name: 'Problems in the file' });
    await problems.waitFor();
    await expect(problems.textContent()).resolves.toContain('row 3, column 2: (x) "oops" is not a number');
    await expect(problems.textContent()).resolves.toContain('row 4: 3 columns, but the header t,x has 2');
    await shot(page, '01-problems');

    // the reference sprinkling (server/engine/README.md §13) in its diamond of proper time 2√2
    await page.getByLabel('CSV file').setInputFiles(fixture);
    await page.getByLabel('Name').fill('numpy diamond 300');
    await page.getByLabel('Proper time T between the tips').fill(String(2 * Math.SQRT2));
    await page.getByLabel('First lines of the file').waitFor();
    await shot(page, '02-form');
    await page.getByRole('button', { name: 'Import', exact: true }).click();
    await page.waitForURL(/\/causal-sets\/[0-9a-f-]{36}$/);
    await page.getByRole('heading', { name: 'numpy diamond 300' }).waitFor();
    await page.getByRole('figure', { name: 'Elements' }).locator('.main-svg').first().waitFor();
    const summary = page.getByRole('table', { name: 'Summary' });
    await expect(summary.textContent()).resolves.toContain('300');
    await page.getByRole('link', { name: 'Start a run on this set' }).waitFor();
    await shot(page, '03-preview');

    // the original bytes come back under the original name
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download the original file' }).click()]);
    expect(download.suggestedFilename()).toBe('diamond300.csv');
    const saved = await download.path();
    expect(readFileSync(saved!).equals(readFileSync(fixture))).toBe(true);

    // a run on the set starts from its page and opens the run
    await page.getByRole('link', { name: 'Start a run on this set' }).click();
    await page.waitForURL(/\/runs\/new\?causalSet=/);
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    for (const [label, value] of [['past t', '-0.7071'], ['past x', '0'], ['future t', '0.7071'], ['future x', '0']]) await page.getByLabel(label, { exact: true }).fill(value);
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    const runId = page.url().split('/').pop()!;
    const run = await running.context.dataSource.query('SELECT region_kind, requested_n, request FROM runs WHERE id = $1', [runId]);
    expect(run[0]).toMatchObject({ region_kind: 'imported', requested_n: 300, request: { causalSet: { name: 'numpy diamond 300' }, subregion: { kind: 'diamond' } } });

    // a relation list: the kind and the element count are read off the file
    await page.goto(`${running.baseUrl}/causal-sets/import`);
    await page.getByLabel('CSV file').setInputFiles({ name: 'chain-and-fork.csv', mimeType: 'text/csv', buffer: Buffer.from('i,j\n0,1\n1,2\n2,3\n0,4\n4,5\n1,5\n') });
    await expect.poll(() => page.getByLabel('Element count N').inputValue()).toBe('6');
    await page.getByRole('button', { name: 'Import', exact: true }).click();
    await page.waitForURL(/\/causal-sets\/[0-9a-f-]{36}$/);
    await page.getByRole('figure', { name: 'Layers' }).locator('.main-svg').first().waitFor();
    await expect(page.getByRole('table', { name: 'Summary' }).textContent()).resolves.toContain('Height');
    await shot(page, '05-relations');

    await page.goto(`${running.baseUrl}/causal-sets`);
    const table = page.getByRole('table', { name: 'Causal sets' });
    await table.waitFor();
    await expect(table.textContent()).resolves.toContain('numpy diamond 300');
    await shot(page, '04-table');
    expect(pageErrors).toEqual([]);
    await page.close();
  });

  it('a viewer sees the table but no Import button', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 800 } });
    await signIn(page, running.baseUrl, viewer, '/causal-sets');
    await page.getByRole('table', { name: 'Causal sets' }).waitFor();
    expect(await page.getByRole('link', { name: 'Import', exact: true }).count()).toBe(0);
    await page.close();
  });
});
