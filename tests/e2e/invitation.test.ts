import { describe, expect, it } from 'vitest';
import { demoPassword, demoTeamName } from '../../server/db/demo-team';
import { screenshot, useRunningApp } from './browser';

describe('inviting a colleague in the browser', () => {
  const running = useRunningApp();

  it('the owner invites by e-mail, the link in the outbox lets the invitee sign up into the team', async () => {
    const invitee = 'leena.virtanen@tacet.example';
    const ownerContext = await running.browser.newContext({ viewport: { width: 1280, height: 860 } });
    const owner = await ownerContext.newPage();
    await owner.goto(`${running.baseUrl}/signin`);
    await owner.getByLabel('E-mail').fill('ingrid.halvorsen@tacet.example');
    await owner.getByLabel('Password').fill(demoPassword);
    await owner.getByRole('button', { name: 'Sign in' }).click();
    // The start page is the runs table; the team is one link away.
    await owner.waitForURL('**/runs');
    await owner.getByRole('link', { name: 'Team', exact: true }).click();
    await owner.waitForURL('**/team');

    // A malformed address is refused by the shared schema before any request.
    await owner.getByLabel('E-mail of the person to invite').fill('leena.virtanen');
    await owner.getByRole('button', { name: 'Send invitation' }).click();
    await owner.getByText('Enter a valid e-mail address.').waitFor();

    await owner.getByLabel('E-mail of the person to invite').fill(invitee);
    await owner.getByLabel('Role', { exact: true }).selectOption('viewer');
    await owner.getByRole('button', { name: 'Send invitation' }).click();
    await owner.getByTestId(`invitation-${invitee}`).waitFor();
    await expect(owner.getByTestId(`invitation-${invitee}`).textContent()).resolves.toContain('Waiting');

    await owner.getByRole('link', { name: 'outbox', exact: true }).click();
    await owner.waitForURL('**/outbox');
    const message = owner.getByRole('article').filter({ hasText: invitee });
    await message.waitFor();
    await screenshot(owner, 'invitation-01-outbox');
    const link = await message.locator('a[href*="/invite/"]').getAttribute('href');
    expect(link).toMatch(new RegExp(`^${running.baseUrl}/invite/[A-Za-z0-9_-]+$`));

    const inviteeContext = await running.browser.newContext({ viewport: { width: 1280, height: 860 } });
    const page = await inviteeContext.newPage();
    await page.goto(link!);
    await page.getByRole('heading', { name: `Join ${demoTeamName}` }).waitFor();
    await expect(page.getByLabel('E-mail').inputValue()).resolves.toBe(invitee);
    await screenshot(page, 'invitation-02-accept');
    await page.getByLabel('Your name').fill('Leena Virtanen');
    await page.getByLabel('Password').fill('lattice-points-7');
    await page.getByRole('button', { name: 'Create account and join' }).click();
    await page.waitForURL('**/team');
    await page.getByRole('table', { name: 'Members' }).waitFor();
    await screenshot(page, 'invitation-03-joined');
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe(demoTeamName);
    await expect(page.getByTestId('current-role').textContent()).resolves.toBe('Viewer');

    // The owner's list now shows the invitation as used.
    await owner.goto(`${running.baseUrl}/team`);
    await expect(owner.getByTestId(`invitation-${invitee}`).textContent()).resolves.toContain('Accepted');

    await ownerContext.close();
    await inviteeContext.close();
  });
});
