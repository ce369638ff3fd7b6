import { describe, expect, it } from 'vitest';
import { formatEntropy, formatQuantity } from '@shared/precision';
import { screenshot, signIn, useRunningApp } from './browser';

const owner = 'ingrid.halvorsen@tacet.example';

/**
 * Issue 18 §5 in the browser: one precision rule. A run's cut λc and S read the same on the run page,
 * in the spectrum's legend and in the e-mail the author gets; the trace check shows its difference
 * rather than two equal roundings; S_α follows the same rule; at 1440 px and at phone width.
 */
describe('one precision rule on the page, in the legend and in the e-mail', () => {
  const running = useRunningApp({ worker: true });

  it('prints a run’s numbers with the same digits everywhere', async () => {
    const page = await signIn(running, owner);
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/runs/new`);
    await page.getByLabel('N (elements)').fill('300');
    await page.getByLabel('Seed').fill('numbers-issue-18');
    await page.getByLabel('Title').fill('Precision rule');
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByLabel('Rényi orders α').fill('2');
    await page.getByRole('checkbox', { name: /^Double truncation/ }).check();
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    const runId = page.url().split('/').pop()!;

    const cut = page.getByTestId('cut-lambda');
    await cut.waitFor({ timeout: 120_000 });
    const cutValue = Number(await cut.getAttribute('data-value'));
    const cutText = formatQuantity(cutValue, 'cut');
    expect((await cut.innerText()).replace(/\s/g, '')).toBe(cutText);

    const entropy = page.getByTestId('entropy-S');
    const S = Number(await entropy.getAttribute('data-value'));
    const entropyText = formatEntropy(S);
    expect((await entropy.innerText()).replace(/\s/g, '')).toBe(entropyText.replace(/\s/g, ''));
    // four significant digits for an entropy (shared/precision.ts), not the engine's 17
    if (Math.abs(S) > 1e-6) expect(entropyText.replace(/[^0-9]/g, '').replace(/^0+/, '').length).toBeLessThanOrEqual(4);

    const renyi = page.getByTestId('renyi-2');
    const S2 = Number(await renyi.getAttribute('data-value'));
    expect((await renyi.locator('td').innerText()).replace(/\s/g, '')).toBe(formatEntropy(S2).replace(/\s/g, ''));

    // the trace of W and the sum of the kept eigenvalues are shown with their difference
    const trace = page.getByTestId('trace-check');
    await trace.waitFor();
    expect(await trace.innerText()).toMatch(/difference/);
    expect(Math.abs(Number(await trace.getAttribute('data-difference')))).toBeLessThan(1e-8);

    const spectrum = page.getByRole('figure', { name: /spectrum/i }).first();
    await spectrum.locator('.legend').waitFor();
    expect(await spectrum.locator('.legend').textContent()).toContain(`cut λc = ${cutText}`);
    await screenshot(page, 'numbers-01-run-1440');
    await page.setViewportSize({ width: 390, height: 844 });
    await screenshot(page, 'numbers-02-run-390');

    // the author's e-mail, in the team's outbox
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/outbox`);
    const message = page.getByRole('article', { name: /run Precision rule finished/ });
    await message.waitFor({ timeout: 30_000 });
    const text = await message.innerText();
    expect(text).toContain(`cut λ = ${cutText}`);
    expect(text).toContain(`S = ${entropyText}`);
    expect(text).toContain(`S_2 = ${formatEntropy(S2)}`);
    expect(text).toContain(runId);
    await screenshot(page, 'numbers-03-outbox');
  });
});
