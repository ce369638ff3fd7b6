import { ENTROPY_FLOOR } from '@shared/precision';
import { readFile } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { screenshot, signIn, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';
const viewer = 'mira.castellanos@tacet.example';

describe('a vacuum run in the browser', () => {
  const running = useRunningApp({ worker: true });
  let runId: string;

  it('a researcher submits a small run with a subregion, watches it finish and sees the spectrum', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.getByText('No runs yet.').waitFor();

    await page.getByRole('link', { name: 'New run' }).click();
    await page.waitForURL('**/runs/new');
    // Sensible defaults: a 2D diamond of proper time 2, N = 500, fixed, √N/4π.
    await expect(page.getByLabel('N (elements)').inputValue()).resolves.toBe('500');
    await expect(page.getByLabel('Proper time T').inputValue()).resolves.toBe('2');

    // Bad input is refused beside its field before anything is sent.
    await page.getByLabel('N (elements)').fill('0');
    await page.getByLabel('Compute the entanglement entropy of a subregion').check();
    await page.getByLabel('future t').fill('0.1');
    await page.getByLabel('future x').fill('0.6');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.getByText(/N is a whole number of elements, at least 2/).waitFor();
    await page.getByText(/future tip must lie strictly inside the future light cone/).waitFor();
    await screenshot(page, 'runs-01-form-errors');
    expect(page.url()).toMatch(/\/runs\/new$/);

    await page.getByLabel('N (elements)').fill('300');
    await page.getByLabel('future t').fill('0.5');
    await page.getByLabel('future x').fill('0');
    await page.getByLabel('Seed').fill('browser-test-1');
    await page.getByLabel('Title').fill('Browser test diamond');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    runId = page.url().split('/').pop()!;
    await screenshot(page, 'runs-02-submitted');

    // The page polls until the worker is done; then the plots, tables and caution appear.
    const spectrum = page.getByRole('figure', { name: 'Spectrum' });
    await spectrum.waitFor({ timeout: 90_000 });
    await spectrum.locator('.js-plotly-plot .scatterlayer .trace').first().waitFor();
    await expect(page.getByTestId('run-progress').count()).resolves.toBe(0);
    const traceCount = await spectrum.locator('.scatterlayer .trace').count();
    // kept modes, discarded modes, continuum, cut
    expect(traceCount).toBe(4);
    const legend = await spectrum.locator('.legend').textContent();
    // plot text is typeset (src/lib/plotText.ts): x_k is set as x<sub>k</sub>, which Plotly reads back with zero-width spaces
    expect(legend).toMatch(/continuum N\/\(4x\u200b?k\u200b?\)/);
    expect(legend).toMatch(/cut λc = /);
    await page.getByRole('figure', { name: 'Points' }).locator('.scatterlayer .trace').first().waitFor();
    await expect(page.getByTestId('caution').textContent()).resolves.toMatch(/Finite-size effects.*truncation rule is a modelling choice/s);

    // The entropy shown is the stored one.
    const detail = await page.request.get(`${running.baseUrl}/api/runs/${runId}`);
    const body = await detail.json();
    expect(body.status).toBe('done');
    expect(body.result.N).toBe(300);
    const shownS = page.getByTestId('entropy-S');
    expect(Number(await shownS.getAttribute('data-value'))).toBe(body.result.entropy.S);
    // Shown by the precision rule (shared/precision.ts): four significant digits, or — for this truncated,
    // pure whole-region state restricted without a second cut — the floor text instead of rounding noise.
    const shownText = (await shownS.textContent())!.replace(/\s/g, '');
    if (Math.abs(body.result.entropy.S) <= ENTROPY_FLOOR) expect(shownText).toBe('0(belowthenumericalfloor1e-6)');
    else expect(shownText).toMatch(/^(\d\.\d{3}|\d{2}\.\d{2}|\d{3}\.\d)(×10-?\d+)?$/);
    await screenshot(page, 'runs-03-done');

    // Points CSV: one row per element under the t,x header.
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Points (CSV)' }).click()]);
    expect(download.suggestedFilename()).toBe(`tacet-run-${runId.slice(0, 8)}-points.csv`);
    const csv = (await readFile((await download.path())!, 'utf8')).trim().split('\n');
    expect(csv[0]).toBe('t,x');
    expect(csv).toHaveLength(301);

    // Every plot downloads as an image.
    const [image] = await Promise.all([page.waitForEvent('download'), spectrum.getByRole('button', { name: 'SVG' }).click()]);
    expect(image.suggestedFilename()).toBe(`tacet-run-${runId.slice(0, 8)}-spectrum.svg`);
    expect(await readFile((await image.path())!, 'utf8')).toContain('<svg');

    await page.getByRole('link', { name: 'Runs', exact: true }).click();
    const row = page.getByTestId(`run-${runId}`);
    await row.waitFor();
    await expect(row.textContent()).resolves.toMatch(/Browser test diamond.*Done.*2D causal diamond.*300.*√N\/4π/s);
    await screenshot(page, 'runs-04-table');

    // A second, smaller run without a subregion, to overlay on the first.
    await page.getByRole('link', { name: 'New run' }).click();
    await page.getByLabel('N (elements)').fill('150');
    await page.getByLabel('Seed').fill('browser-test-2');
    await page.getByLabel('Title').fill('Browser test N=150');
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL((url) => /\/runs\/[0-9a-f-]{36}$/.test(url.pathname) && !url.pathname.endsWith(runId));
    const secondId = page.url().split('/').pop()!;
    await page.getByRole('figure', { name: 'Spectrum' }).waitFor({ timeout: 90_000 });
    await page.getByRole('link', { name: 'Runs', exact: true }).click();
    await page.getByTestId(`run-${secondId}`).waitFor();
    await page.getByRole('checkbox', { name: 'Compare Browser test diamond' }).check();
    await page.getByRole('checkbox', { name: 'Compare Browser test N=150' }).check();
    await page.getByRole('button', { name: /Compare/ }).click();
    await page.waitForURL(`**/runs/compare?ids=${runId},${secondId}`);
    const overlay = page.getByRole('figure', { name: 'Compared spectra' });
    await overlay.locator('.scatterlayer .trace').first().waitFor();
    // two runs, each with its cut λ_c as a line in its colour, and, normalised by N, one shared continuum curve
    await expect(overlay.locator('.scatterlayer .trace').count()).resolves.toBe(5);
    await expect(overlay.locator('.legend').textContent()).resolves.toMatch(/Browser test diamond \(N = 300\).*Browser test N=150 \(N = 150\).*continuum 1\/\(4x\u200b?k\u200b?\)/s);
    await screenshot(page, 'runs-05-compare');
    expect(pageErrors).toEqual([]);
    await page.context().close();
  });

  it('a viewer reads the run but is offered no create, cancel, re-analyse or delete', async () => {
    expect(runId).toBeDefined();
    const page = await signIn(running, viewer);
    await page.getByTestId(`run-${runId}`).waitFor();
    await expect(page.getByRole('link', { name: 'New run' }).count()).resolves.toBe(0);

    await page.getByRole('link', { name: 'Browser test diamond' }).click();
    await page.getByRole('figure', { name: 'Spectrum' }).waitFor();
    await expect(page.getByRole('button', { name: /Delete|Cancel run|Re-analyse/ }).count()).resolves.toBe(0);
    await expect(page.getByRole('button', { name: 'Spectrum (CSV)' }).isVisible()).resolves.toBe(true);
    await screenshot(page, 'runs-06-viewer');

    await page.goto(`${running.baseUrl}/runs/new`);
    await page.getByText(/Viewers read and export runs but do not start them/).waitFor();
    await expect(page.getByRole('button', { name: 'Start run' }).count()).resolves.toBe(0);
    await page.context().close();
  });
});
