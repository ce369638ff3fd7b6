import { describe, expect, it } from 'vitest';
import { screenshot, signIn, useRunningApp } from './browser';

// Issue 18 §7 in the browser: one e-mail switch per kind on the Account page, and the runs page
// saying what Compare does in its own text, not only in a tooltip.
describe('the words of the Account and runs pages', () => {
  const running = useRunningApp();

  it('the Account page has a switch for run e-mails and one for study e-mails, each kept apart', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    await page.goto(`${running.baseUrl}/account`);
    const runs = page.getByRole('switch', { name: 'E-mail me when a run finishes' });
    const studies = page.getByRole('switch', { name: 'E-mail me when a study finishes' });
    await runs.waitFor();
    await studies.waitFor();
    const before = await studies.getAttribute('aria-checked');
    await runs.click();
    await expect.poll(() => runs.isDisabled()).toBe(false);
    await page.reload();
    await studies.waitFor();
    expect(await studies.getAttribute('aria-checked')).toBe(before);
    await screenshot(page, 'words-01-account-switches');
  });

  it('the runs page explains Compare in visible text', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    await page.goto(`${running.baseUrl}/runs`);
    const explanation = page.getByTestId('compare-explanation');
    await explanation.waitFor();
    expect(await explanation.isVisible()).toBe(true);
    expect(await explanation.innerText()).toMatch(/tick 2 to 6 finished runs/i);
    await screenshot(page, 'words-02-runs-compare');
  });
});
