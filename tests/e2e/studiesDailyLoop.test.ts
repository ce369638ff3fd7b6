import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoTeamName } from '../../server/db/demo-team';
import { insertCutRule } from '../../server/db/repositories/cutRules';
import { screenshot, signIn, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';

/** A page at both widths every page must work at: the desk (1440 px) and the phone (390 px). */
async function atBothWidths(page: Page, name: string): Promise<void> {
  await page.setViewportSize({ width: 1440, height: 900 });
  await screenshot(page, `${name}-1440`);
  await page.setViewportSize({ width: 390, height: 844 });
  await screenshot(page, `${name}-390`);
  // a wide table scrolls in its own box, the page itself never sideways
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
  await page.setViewportSize({ width: 1440, height: 900 });
}

describe('the daily loop of scaling studies in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('four rules with a saved one, extend, open a cell as a run, duplicate, search and filter', async () => {
    const m = running.context.dataSource.manager;
    const [{ team_id: teamId, user_id: userId }] = await m.query(
      `SELECT t.id AS team_id, u.id AS user_id FROM teams t JOIN memberships ms ON ms.team_id = t.id JOIN users u ON u.id = ms.user_id WHERE t.name = $1 AND u.email = $2`,
      [demoTeamName, researcher],
    );
    await insertCutRule(m, { teamId, name: 'Thirty modes', rule: { rule: 'modes', count: 30 }, note: null, createdBy: userId });

    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.goto(`${running.baseUrl}/studies/new`);
    await page.getByLabel('Title').fill('Daily loop (browser)');
    await page.getByLabel('N values').fill('120, 160');
    await page.getByLabel('Seeds per N').fill('2');
    await page.getByLabel('ℓ/T values').fill('0.5');

    // two rules to start with; a third from the saved cut rule, a fourth set here; then no more
    const addRule = page.getByRole('button', { name: 'Add a cut rule' });
    await addRule.click();
    await page.getByTestId('study-rule-3').getByLabel('Saved cut rule').selectOption({ label: 'Thirty modes — top 30 modes' });
    await expect(page.getByTestId('study-rule-3').getByLabel('modes kept').inputValue()).resolves.toBe('30');
    await expect(page.getByTestId('study-rule-3').getByLabel('Saved cut rule').inputValue()).resolves.not.toBe('');
    await addRule.click();
    await page.getByTestId('study-rule-4').getByLabel('Truncation rule').selectOption('lambda');
    await page.getByTestId('study-rule-4').getByLabel('λc').fill('0.5');
    await expect(addRule.isDisabled()).resolves.toBe(true);
    await expect(page.getByText('4 of at most 4').isVisible()).resolves.toBe(true);
    await atBothWidths(page, 'study-loop-01-four-rules');

    await page.getByRole('button', { name: 'Start study' }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    const studyUrl = page.url();
    await page.getByText('4 of 4 sprinklings done').waitFor({ timeout: 90_000 });
    const header = (await page.getByTestId('aggregate-table').locator('thead').textContent()) ?? '';
    for (const label of ['untruncated', 'double-truncated', 'state cut 30 modes', 'state cut λ = 0.5']) expect(header).toContain(label);
    expect(await page.getByTestId('aggregate-table').locator('thead th').count()).toBe(4 + 4);

    // extend: one more N and one more seed; the two old N get the new seed, the new N all three
    await page.getByLabel('More N values').fill('200');
    await page.getByLabel('More seeds per N').fill('1');
    await expect(page.getByText('adds seed-3').isVisible()).resolves.toBe(true);
    await page.getByRole('button', { name: 'Extend study' }).click();
    await page.getByText('5 sprinklings queued.').waitFor();
    await page.getByText('9 of 9 sprinklings done').waitFor({ timeout: 120_000 });
    await page.getByTestId('aggregate-table').locator('tbody tr').nth(2).waitFor();
    const rows = page.getByTestId('aggregate-table').locator('tbody tr');
    expect(await rows.count()).toBe(3);
    for (let k = 0; k < 3; k++) expect((await rows.nth(k).locator('td').nth(2).textContent())?.trim()).toBe('3');
    expect(await page.getByTestId('study-cell-row').count()).toBe(9);
    await page.waitForTimeout(500);
    await atBothWidths(page, 'study-loop-02-extended');

    // a cell as a run: the run page with its own spectrum
    await page.getByLabel('and the cut rule').selectOption('sqrtN+double');
    await page.getByTestId('study-cell-row').first().getByRole('button', { name: 'Open as run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.getByRole('heading', { name: /Daily loop \(browser\): N = 120, seed seed-1, ℓ\/T = 0\.5/ }).waitFor();
    await page.getByRole('figure', { name: 'Spectrum' }).waitFor({ timeout: 60_000 });
    // the run names the study and the cell it came from, linked back to the study
    await expect(page.getByTestId('run-origin').innerText()).resolves.toMatch(/^from study .+, cell N = 120, seed seed-1$/);
    expect(await page.getByTestId('run-origin').getByRole('link').getAttribute('href')).toBe(new URL(studyUrl).pathname);
    await screenshot(page, 'study-loop-03-cell-as-run');

    // duplicate: the form with every setting of the grown study
    await page.goto(studyUrl);
    await page.getByRole('link', { name: 'Duplicate' }).click();
    await page.waitForURL(/\/studies\/new\?from=/);
    await page.getByTestId('copied-from').getByRole('link').waitFor();
    await expect(page.getByLabel('Title').inputValue()).resolves.toBe('Daily loop (browser)');
    await expect(page.getByLabel('N values').inputValue()).resolves.toBe('120, 160, 200');
    await expect(page.getByLabel('Seeds per N').inputValue()).resolves.toBe('3');
    await expect(page.getByLabel('ℓ/T values').inputValue()).resolves.toBe('0.5');
    await expect(page.getByTestId('study-rule-3').getByLabel('Truncation rule').inputValue()).resolves.toBe('modes');
    await expect(page.getByTestId('study-rule-4').getByLabel('λc').inputValue()).resolves.toBe('0.5');
    await expect(page.getByTestId('study-rule-2').getByRole('checkbox', { name: /Double truncation/ }).isChecked()).resolves.toBe(true);
    await atBothWidths(page, 'study-loop-04-duplicate');

    // the list: search and filters live in the URL, and an empty result says so
    await page.goto(`${running.baseUrl}/studies`);
    await page.getByTestId('studies-table').waitFor();
    await page.getByLabel('Search').fill('daily LOOP');
    await page.waitForURL(/search=daily/);
    await expect.poll(() => page.getByTestId('studies-table').locator('tbody tr').count()).toBe(1);
    await page.getByLabel('Status').selectOption('done');
    await page.reload();
    await expect(page.getByLabel('Search').inputValue()).resolves.toBe('daily LOOP');
    await expect.poll(() => page.getByTestId('studies-table').locator('tbody tr').count()).toBe(1);
    await atBothWidths(page, 'study-loop-05-filtered');
    await page.getByLabel('Status').selectOption('cancelled');
    await page.getByText('No study matches these filters.').waitFor();
    await screenshot(page, 'study-loop-06-no-match');
    await page.getByRole('button', { name: 'Clear the filters' }).click();
    await expect(page.getByLabel('Search').inputValue()).resolves.toBe('');
    expect(pageErrors).toEqual([]);
    await page.context().close();
  }, 300_000);
});
