import { describe, expect, it } from 'vitest';
import { demoPassword, demoTeamName } from '../../server/db/demo-team';
import { screenshot, useRunningApp } from './browser';

const owner = 'ingrid.halvorsen@tacet.example';
const viewer = 'mira.castellanos@tacet.example';

describe('signing in and out in the browser', () => {
  const running = useRunningApp();

  it('the demo owner signs in, sees the team page, and signs out', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 860 } });
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/team`);
    await page.waitForURL('**/signin');
    await screenshot(page, 'signin-01-form');

    // The shared schema stops an empty form before it reaches the server. The schema loads at the first
    // submit (it is not part of the page's first load), so the message comes a moment after the click.
    const signInRequests: string[] = [];
    page.on('request', (request) => {
      if (request.url().endsWith('/api/auth/login')) signInRequests.push(request.method());
    });
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText('Enter a valid e-mail address.').waitFor();
    expect(signInRequests).toEqual([]);

    await page.getByLabel('E-mail').fill(owner);
    await page.getByLabel('Password').fill('not-the-password-1');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('alert').first().waitFor();
    expect(page.url()).toMatch(/\/signin$/);

    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/team');
    await page.getByRole('table', { name: 'Members' }).waitFor();
    await screenshot(page, 'signin-02-team');

    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe(demoTeamName);
    await expect(page.getByTestId('current-role').textContent()).resolves.toBe('Owner');
    const memberRows = page.getByRole('table', { name: 'Members' }).locator('tbody tr');
    const memberText = await memberRows.allTextContents();
    expect(memberText).toHaveLength(3);
    expect(memberText.join(' ')).toContain('tomas.okafor@tacet.example');
    // Owners manage the team: invitation form and outbox are offered.
    await expect(page.getByRole('button', { name: 'Send invitation' }).isVisible()).resolves.toBe(true);
    await expect(page.getByRole('link', { name: 'Outbox' }).isVisible()).resolves.toBe(true);

    // Numbers are set in the bundled JetBrains Mono, not a fallback face.
    const monoLoaded = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].some((face) => face.family.includes('JetBrains Mono') && face.status === 'loaded');
    });
    expect(monoLoaded).toBe(true);

    await page.getByRole('button', { name: 'Ingrid Halvorsen' }).click();
    await page.getByRole('menuitem', { name: 'Sign out' }).click();
    await page.waitForURL('**/signin');
    await screenshot(page, 'signin-03-signed-out');

    // The session is revoked, not just forgotten by the page.
    const me = await page.request.get(`${running.baseUrl}/api/me`);
    expect(me.status()).toBe(401);
    await page.goto(`${running.baseUrl}/team`);
    await page.waitForURL('**/signin');

    expect(pageErrors).toEqual([]);
    await page.close();
  });

  it('returns a viewer to the page they asked for and hides what viewers cannot do', async () => {
    const page = await running.browser.newPage({ viewport: { width: 1280, height: 860 } });
    await page.goto(`${running.baseUrl}/account`);
    await page.waitForURL('**/signin');
    await page.getByLabel('E-mail').fill(viewer);
    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/account');
    await page.getByRole('heading', { name: 'Account' }).waitFor();

    await page.getByRole('link', { name: 'Team' }).click();
    await page.getByRole('table', { name: 'Members' }).waitFor();
    await screenshot(page, 'signin-04-viewer-team');
    await expect(page.getByTestId('current-role').textContent()).resolves.toBe('Viewer');
    await expect(page.getByRole('button', { name: 'Send invitation' }).count()).resolves.toBe(0);
    await expect(page.getByRole('link', { name: 'Outbox' }).count()).resolves.toBe(0);
    await expect(page.getByRole('combobox').count()).resolves.toBe(0);
    await page.close();
  });
});
