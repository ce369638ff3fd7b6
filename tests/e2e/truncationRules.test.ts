import { describe, expect, it } from 'vitest';
import { screenshot, signIn, useRunningApp } from './browser';

/**
 * The restricted cut of double truncation and the 4D caution, as a researcher meets them in the browser:
 * a 4D region proposes the knee, the researcher picks √N/4π anyway and a fixed restricted λ, and the run
 * page states both the restricted cut and the caution that √N/(4π) is a 2D rule.
 */
describe('truncation rules in the browser: restricted cut, 4D caution, knee', () => {
  const running = useRunningApp({ worker: true });

  it('a 4D run with √N/4π and a fixed restricted λ shows both on its page', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    const context = page.context();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/runs/new`);
    await expect(page.getByLabel('Truncation rule').inputValue()).resolves.toBe('sqrtN');
    await page.getByLabel('Region', { exact: true }).selectOption('diamond4d');
    // √N/(4π) is a 2D rule: a 4D region proposes the knee
    await expect(page.getByLabel('Truncation rule').inputValue()).resolves.toBe('knee');
    await page.getByLabel('Truncation rule').selectOption('sqrtN');
    await page.getByLabel('N (elements)').fill('300');
    await page.getByLabel('Seed').fill('browser-4d');
    await page.getByLabel('Title').fill('4D restricted cut');
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByRole('checkbox', { name: /^Double truncation/ }).check();
    await page.getByLabel('Restricted cut', { exact: true }).selectOption('lambda');
    // a bad λ is refused beside its field
    await page.getByLabel('Restricted λ').fill('-1');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.getByText('The restricted cut λ is a number ≥ 0.').waitFor();
    await page.getByLabel('Restricted λ').fill('0.3');
    await screenshot(page, 'restricted-01-form');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);

    await page.getByRole('figure', { name: 'Spectrum' }).waitFor({ timeout: 90_000 });
    await expect(page.getByTestId('restricted-cut').textContent()).resolves.toBe('λ = 0.3');
    await expect(page.getByTestId('rule-cautions').textContent()).resolves.toMatch(/√N\/\(4π\) is a rule from 2D work.*Here it keeps \d+ of \d+ positive modes/s);
    await expect(page.getByRole('table', { name: 'Settings' }).textContent()).resolves.toMatch(/Restricted cut\s*λ = 0\.3/);
    await screenshot(page, 'restricted-02-run');

    await page.getByRole('link', { name: 'Runs', exact: true }).click();
    await page.getByText('restricted λ = 0.3').first().waitFor();
    await screenshot(page, 'restricted-03-table');
    expect(pageErrors).toEqual([]);
    await context.close();
  }, 150_000);

  it('a 2D knee run draws the knee, its tolerance band and the fitted law on the spectrum', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    const context = page.context();
    await page.goto(`${running.baseUrl}/runs/new`);
    await page.getByLabel('Truncation rule').selectOption('knee');
    await page.getByLabel('N (elements)').fill('1000');
    await page.getByLabel('Seed').fill('browser-knee');
    await page.getByLabel('Title').fill('Knee on a 2D diamond');
    await page.getByLabel('Engine').selectOption('dense');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    const spectrum = page.getByRole('figure', { name: 'Spectrum' });
    await spectrum.waitFor({ timeout: 120_000 });
    await spectrum.locator('.scatterlayer .trace').first().waitFor();
    const legend = (await spectrum.locator('.legend').textContent()) ?? '';
    expect(legend).toMatch(/knee: \d+ modes follow the fitted law within 5 %/);
    expect(legend).toMatch(/knee at tolerance 2\.5 % to 7\.5 %: \d+ to \d+ modes/);
    await screenshot(page, 'knee-01-spectrum');
    await context.close();
  }, 180_000);
});
