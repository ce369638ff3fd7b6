import { readFile } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { demoPassword } from '../../server/db/demo-team';
import { screenshot, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';

describe('a scaling study in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('the demo researcher plans a study, watches it finish and downloads the exports', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/signin`);
    await page.getByLabel('E-mail').fill(researcher);
    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/runs');
    await page.getByRole('link', { name: 'Studies', exact: true }).click();
    await page.waitForURL('**/studies');
    await page.getByText('No studies yet.').waitFor();
    await page.getByRole('link', { name: 'New study' }).first().click();
    await page.waitForURL('**/studies/new');

    // the shared schema stops a grid the worker could not compute before it reaches the server
    await page.getByLabel('N values').fill('100, 10');
    await page.getByRole('button', { name: 'Start study' }).click();
    await expect(page.getByText('N must be at least 20').isVisible()).resolves.toBe(true);
    await screenshot(page, 'study-01-form-error');

    await page.getByLabel('Title').fill('Diamond entropy scaling (demo)');
    await page.getByLabel('N values').fill('120, 240, 480');
    await page.getByLabel('Seeds per N').fill('3');
    await page.getByLabel('ℓ/T values').fill('0.4, 0.6');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    await page.getByTestId('study-progress').waitFor();
    await screenshot(page, 'study-02-progress');

    await page.getByText('9 of 9 sprinklings done').waitFor({ timeout: 90_000 });
    await page.getByTestId('aggregate-table').waitFor();
    await page.getByTestId('figure-tacet-study-' + page.url().split('/').pop()!.slice(0, 8) + '-spectra').waitFor();
    await page.waitForTimeout(500);
    await screenshot(page, 'study-03-done');

    const aggregateRows = await page.getByTestId('aggregate-table').locator('tbody tr').count();
    expect(aggregateRows).toBe(6); // 3 N × 2 sub-diamonds
    const fitsText = await page.getByTestId('fits-table').textContent();
    expect(fitsText).toContain('double-truncated');
    expect(fitsText).toContain('all points');
    await expect(page.getByTestId('caution').textContent()).resolves.toMatch(/modelling choice/);

    const downloadOf = async (label: string) => {
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: label }).click()]);
      return { name: download.suggestedFilename(), text: await readFile((await download.path())!, 'utf8') };
    };
    const tidy = await downloadOf('Entropies (CSV)');
    expect(tidy.name).toMatch(/^tacet-study-[0-9a-f]{8}-entropies\.csv$/);
    expect(tidy.text.trimEnd().split('\n')).toHaveLength(1 + 9 * 2 * 2);
    const latex = await downloadOf('Table (LaTeX)');
    expect(latex.text).toContain('\\toprule');
    const methods = await downloadOf('Methods paragraph (text)');
    expect(methods.text).toMatch(/Sorkin and Yazdi 2018/);
    const png = await Promise.all([
      page.waitForEvent('download'),
      page.getByTestId(/figure-.*-S-vs-ln-sqrt-n/).getByRole('button', { name: 'SVG' }).click(),
    ]);
    expect(png[0].suggestedFilename()).toMatch(/S-vs-ln-sqrt-n\.svg$/);

    await page.getByRole('link', { name: 'All studies' }).click();
    await page.getByTestId('studies-table').waitFor();
    await screenshot(page, 'study-04-table');
    expect(pageErrors).toEqual([]);
  }, 180_000);
});
