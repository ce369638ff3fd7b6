import { describe, expect, it } from 'vitest';
import { regionDescriptors } from '@shared/regions';
import { screenshot, signIn, useRunningApp } from './browser';

// Issue 16 in the browser: a run on a Poincaré-patch diamond from the new-run form — the tips follow the
// region, the field is massless only, and the run page shows the caution, conformal axes and the
// set's manifold-likeness.
describe('a de Sitter run in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('is set up, computed and shown', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    await page.goto(`${running.baseUrl}/runs/new`);
    // the global slab has an observer's horizons: one click fills the tips with (T, θ) = (∓π/2, 0) (server/engine/README.md §17)
    await page.getByLabel('Region', { exact: true }).selectOption('deSitterSlab2d');
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByRole('button', { name: 'Horizon-bounded part' }).click();
    expect(Number(await page.getByLabel('past t').first().inputValue())).toBeCloseTo(-Math.PI / 2, 4);
    expect(Number(await page.getByLabel('future t').first().inputValue())).toBeCloseTo(Math.PI / 2, 4);
    await screenshot(page, 'de-sitter-00-horizon-part');
    await page.getByLabel('Region', { exact: true }).selectOption('deSitterDiamond2d');
    // a Poincaré diamond has no horizon-bounded part to offer
    await expect(page.getByRole('button', { name: 'Horizon-bounded part' }).count()).resolves.toBe(0);
    await expect(page.getByLabel('Past tip η₀').inputValue()).resolves.toBe(regionDescriptors.deSitterDiamond2d.defaults.etaPast);
    await expect(page.getByLabel('Mass m').isDisabled()).resolves.toBe(true);
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    // the sub-diamond's tips moved into the region (η < 0), so the form has nothing to refuse
    expect(Number(await page.getByLabel('past t').first().inputValue())).toBeLessThan(0);
    await page.getByLabel('N (elements)').fill('400');
    await page.getByLabel('Title').fill('Poincaré diamond in the browser');
    await screenshot(page, 'de-sitter-01-form');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);

    const points = page.getByRole('figure', { name: 'Points' });
    await points.waitFor({ timeout: 90_000 });
    await points.locator('.scatterlayer .trace').first().waitFor();
    await expect(points.locator('.g-ytitle').textContent()).resolves.toContain('conformal time η');
    await expect(page.getByTestId('rule-cautions').textContent()).resolves.toMatch(/de Sitter region it is a modelling choice/);
    const panel = page.getByTestId('manifold-likeness');
    await panel.waitFor();
    await expect(panel.innerText()).resolves.toMatch(/Myrheim–Meyer dimension/);
    await screenshot(page, 'de-sitter-02-run');
    const phone = await running.browser.newPage({ viewport: { width: 390, height: 844 } });
    await phone.context().addCookies(await page.context().cookies());
    await phone.goto(page.url());
    await phone.getByTestId('manifold-likeness').waitFor();
    expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await screenshot(phone, 'de-sitter-03-run-phone');
  });
});
