import { describe, expect, it } from 'vitest';
import { screenshot, signIn, useRunningApp } from './browser';

// Issue 18 §9 in the browser: the API reference renders its Markdown and leads back to the app; the
// Account page's token fields stand level with each other.
describe('the API reference and the token form read well', () => {
  const running = useRunningApp();

  it('/api-docs renders Markdown (code, not backticks) and links back to the app', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 900 } });
    await page.goto(`${running.baseUrl}/api-docs`);
    await page.getByRole('heading', { name: 'Tacet API reference' }).waitFor();
    await page.locator('main details').first().waitFor();
    const text = await page.locator('main').innerText();
    expect(text).not.toContain('`');
    // the description's `{ error: { code, message, issues? } }` is set as code
    await expect.poll(() => page.locator('main code', { hasText: 'error' }).count()).toBeGreaterThan(0);
    await screenshot(page, 'api-docs-01-reference');
    await page.getByRole('link', { name: '← Back to Tacet' }).click();
    await page.waitForURL((url) => url.pathname !== '/api-docs');
  });

  it('the Account page lines the token name, team, expiry and button up', async () => {
    const page = await signIn(running, 'tomas.okafor@tacet.example');
    await page.goto(`${running.baseUrl}/account`);
    const form = page.getByRole('form', { name: 'Create API token' });
    await form.waitFor();
    const tops = await Promise.all(
      [form.getByLabel('Token name'), form.getByLabel('Team'), form.getByLabel('Expires'), form.getByRole('button', { name: 'Create token' })].map(
        async (control) => (await control.boundingBox())!.y,
      ),
    );
    for (const top of tops) expect(Math.abs(top - tops[0])).toBeLessThan(1.5);
    await screenshot(page, 'account-01-token-form');
  });
});
