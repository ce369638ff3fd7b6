import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { screenshot, screenshotDir, signIn, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';

describe('a pair study for the mutual information in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('plans pairs with Rényi orders, waits for them and reads the I-vs-d plot with the measured agreement', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/studies/new`);

    await page.getByLabel('Title').fill('Mutual information decay (demo)');
    await page.getByLabel('N values').fill('300');
    await page.getByLabel('Seeds per N').fill('3');
    await page.getByLabel('Kind').selectOption('pairs');
    await page.getByLabel('Pair sizes ℓ/T').fill('0.25');
    await page.getByLabel('Separations d/T').fill('0.03, 0.08, 0.2');
    // α ≤ 0 is refused in place, with the field's words, before anything is sent
    await page.getByLabel('Rényi orders α').fill('0, 2');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.getByText(/a Rényi order α must be > 0/).waitFor();
    await screenshot(page, 'study-entanglement-01-form-error');
    await page.getByLabel('Rényi orders α').fill('2, inf');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    const id8 = page.url().split('/').pop()!.slice(0, 8);

    await page.getByText('3 of 3 sprinklings done').waitFor({ timeout: 90_000 });
    await page.getByTestId('pair-table').waitFor();
    await page.getByTestId(`figure-tacet-study-${id8}-I-vs-d`).waitFor();
    const agreement = await page.getByTestId('pair-agreement').textContent();
    expect(agreement).toMatch(/ℓ\/T = 0\.25, N = 300: measured slope [−-]?[0-9.]+ ± [0-9.]+ against continuum trend [−-][0-9.]+ over d\/T ∈ \[0\.03, 0\.2\]/);
    expect(agreement).toMatch(/difference of large numbers/);
    expect(await page.getByTestId('pair-table').locator('tbody tr').count()).toBe(3);
    expect(await page.getByTestId('pair-fits-table').textContent()).toContain('untruncated');
    // the Rényi orders reach the page as the Rényi mutual information of each pair
    expect(await page.getByTestId('renyi-table').textContent()).toMatch(/⟨I_2⟩ ± SE.*⟨I_∞⟩ ± SE/);
    await page.waitForTimeout(500);
    await screenshot(page, 'study-entanglement-02-done-1440');

    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(500);
    await screenshot(page, 'study-entanglement-03-done-390');
    // the figure alone at phone width, where the legend sits below the axes
    await page.getByTestId(`figure-tacet-study-${id8}-I-vs-d`).screenshot({ path: join(screenshotDir, 'study-entanglement-04-plot-390.png') });
    expect(pageErrors).toEqual([]);
  }, 180_000);

  it('shows ⟨S_α⟩ beside ⟨S⟩ and S_α against ln √n for concentric sub-diamonds', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/studies/new`);
    await page.getByLabel('Title').fill('Rényi scaling (demo)');
    await page.getByLabel('N values').fill('120, 240');
    await page.getByLabel('Seeds per N').fill('2');
    await page.getByLabel('ℓ/T values').fill('0.5, 0.7');
    await page.getByLabel('Rényi orders α').fill('inf, 2');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    const id8 = page.url().split('/').pop()!.slice(0, 8);
    await page.getByText('4 of 4 sprinklings done').waitFor({ timeout: 90_000 });
    // the orders come out ascending, ∞ last, whatever order they were typed in
    expect(await page.getByTestId('renyi-table').locator('thead').textContent()).toMatch(/⟨S_2⟩ ± SE.*⟨S_∞⟩ ± SE/);
    expect(await page.getByTestId('fits-table').textContent()).toMatch(/b for S_2.*b for S_∞/);
    await page.getByTestId(`figure-tacet-study-${id8}-renyi-2-vs-ln-sqrt-n`).waitFor();
    await page.waitForTimeout(500);
    await screenshot(page, 'study-entanglement-05-renyi-1440');
    expect(pageErrors).toEqual([]);
  }, 180_000);
});
