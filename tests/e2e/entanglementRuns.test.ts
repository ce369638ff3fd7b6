import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { screenshot, signIn, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';
const phoneWidth = 390;

/**
 * Issue 15 in the browser: a run with Rényi orders, a mutual-information pair and the complement
 * check, from the form to the run page's Rényi table and plot, mutual-information panel and complement
 * check; at desktop and at phone width (every wide table scrolls in its own box).
 */
describe('a run with Rényi orders, a pair and the complement check', () => {
  const running = useRunningApp({ worker: true });

  it('is filled in, refused where wrong, computed and shown', async () => {
    const page = await signIn(running, researcher);
    await page.setViewportSize({ width: 1440, height: 900 });
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/runs/new`);
    await page.getByLabel('N (elements)').fill('300');
    await page.getByLabel('Seed').fill('browser-issue-15');
    await page.getByLabel('Title').fill('Rényi, pair and complement');
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByLabel('Compute the mutual information of two subregions').check();
    await page.getByText(/each of A, B and A∪B gets its own restricted cut/).waitFor();

    // a bad α is refused beside the Rényi field, with the schema's words
    await page.getByLabel('Rényi orders α').fill('0.5, -2');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.getByText(/α must be > 0/).waitFor();
    expect(page.url()).toMatch(/\/runs\/new$/);

    await page.getByLabel('Rényi orders α').fill('0.5, 2, 3, inf');
    await page.getByLabel('Complement check').check();
    await page.getByRole('checkbox', { name: /^Double truncation/ }).check();
    await screenshot(page, 'entanglement-01-form');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);

    const renyiTable = page.getByRole('table', { name: 'Rényi entropies' });
    await renyiTable.waitFor({ timeout: 90_000 });
    const values = await Promise.all(['0.5', '1', '2', '3', 'inf'].map(async (key) => Number(await page.getByTestId(`renyi-${key}`).getAttribute('data-value'))));
    // Rényi entropies are non-increasing in α (common practice)
    for (let k = 1; k < values.length; k++) expect(values[k]!).toBeLessThanOrEqual(values[k - 1]! + 1e-12);
    const plot = page.getByRole('figure', { name: 'Rényi entropies' });
    await plot.locator('.js-plotly-plot .scatterlayer .trace').first().waitFor();
    // S_∞ is the dashed line of the legend, not a point on the α axis
    await expect(plot.locator('.legend').textContent()).resolves.toMatch(/min-entropy, α → ∞/);

    const panel = page.getByRole('table', { name: 'Mutual information' });
    await panel.waitFor();
    await expect(panel.textContent()).resolves.toMatch(/A∪B/);
    await page.getByTestId('mutual-information-caution').waitFor();
    await page.getByRole('table', { name: 'Complement check' }).waitFor();
    await expect(page.getByText('Purity diagnostic S_O′ − S_O').isVisible()).resolves.toBe(true);
    const points = page.getByRole('figure', { name: 'Points' });
    await points.locator('.js-plotly-plot .scatterlayer .trace').first().waitFor();
    await expect(points.textContent()).resolves.toMatch(/A \(\d+\)/);
    await page.waitForTimeout(500);
    await screenshot(page, 'entanglement-02-run');

    await page.setViewportSize({ width: phoneWidth, height: 844 });
    await page.reload();
    await page.getByRole('table', { name: 'Mutual information' }).waitFor({ timeout: 30_000 });
    await page.getByRole('figure', { name: 'Rényi entropies' }).locator('.js-plotly-plot').waitFor();
    await page.waitForTimeout(800);
    await screenshot(page, 'entanglement-03-run-phone');
    const overflow = await page.evaluate((screen) => Math.max(document.documentElement.scrollWidth, window.innerWidth) - screen, phoneWidth);
    expect(overflow).toBe(0);

    await page.goto(`${running.baseUrl}/runs/new`);
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByLabel('Compute the mutual information of two subregions').check();
    await page.waitForTimeout(300);
    await screenshot(page, 'entanglement-04-form-phone');
    expect(pageErrors).toEqual([]);
  }, 180_000);

  it('on an imported relation list: the new-run form takes element lists only, refuses a label the set lacks beside A, and runs', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    // two chains 0 ≺ 1 ≺ 2 and 3 ≺ 4 ≺ 5, unrelated to each other, and six lone elements
    const file = join(mkdtempSync(join(tmpdir(), 'tacet-')), 'two-chains.csv');
    writeFileSync(file, 'i,j\n0,1\n1,2\n3,4\n4,5\n');
    await page.goto(`${running.baseUrl}/causal-sets/import`);
    await page.locator('input[type="file"]').setInputFiles(file);
    await page.getByLabel('Relations').check();
    await page.getByLabel('Element count N').fill('12');
    await page.getByLabel('Name').fill('two chains');
    await page.getByRole('button', { name: 'Import' }).click();
    await page.waitForURL(/\/causal-sets\/[0-9a-f-]{36}$/);

    // the set's page opens the one new-run form with the set picked
    await page.getByRole('link', { name: 'Start a run on this set' }).click();
    await page.waitForURL(/\/runs\/new\?causalSet=[0-9a-f-]{36}$/);
    const form = page.getByRole('form', { name: 'New run' });
    await form.getByLabel('Compute the entanglement entropy of a subregion').check();
    // a relation list has no coordinates: tips cannot be chosen
    await expect(form.locator('select[name="subregionBy"] option[value="tips"]').isDisabled()).resolves.toBe(true);
    await form.getByLabel('Elements', { exact: true }).fill('0, 1, 2');
    await form.getByLabel('Rényi orders α').fill('2');
    await form.getByLabel('Compute the mutual information of two subregions').check();
    await form.getByLabel('A Elements').fill('0, 99');
    await form.getByLabel('B Elements').fill('3, 4');
    await form.getByRole('button', { name: 'Start run' }).click();
    // element 99 does not exist in a set of 12: the message sits beside A, nothing is sent
    const fieldA = form.getByLabel('A Elements');
    await form.locator('input[name="a-elementList"][aria-invalid="true"]').waitFor();
    const describedBy = (await fieldA.getAttribute('aria-describedby'))!;
    await expect(page.locator(`[id="${describedBy}"]`).textContent()).resolves.toMatch(/Element 99 does not exist/);
    expect(page.url()).toMatch(/\/runs\/new/);
    await screenshot(page, 'entanglement-05-relation-list-refused');

    await fieldA.fill('0, 1');
    await form.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.getByRole('table', { name: 'Mutual information' }).waitFor({ timeout: 60_000 });
    await page.getByRole('table', { name: 'Rényi entropies' }).waitFor();
    await expect(page.getByRole('table', { name: 'Settings' }).textContent()).resolves.toMatch(/Pair A\s*2 listed elements/);
    expect(pageErrors).toEqual([]);
  }, 120_000);
});
