import { join } from 'node:path';
import type { Worker } from 'bullmq';
import type { Page } from 'playwright-core';
import { afterAll, describe, expect, it } from 'vitest';
import { ENTROPY_FLOOR } from '@shared/precision';
import { startTestWorker } from '../support/app';
import { screenshot, signIn, useRunningApp } from './browser';

/**
 * The daily loop in a browser: queue positions while no worker runs, Cancel → Retry, "Same settings,
 * new seed", "Open in the new-run form", and a run on an imported set from its page through the one
 * new-run form. The worker starts only when the queue has been looked at, so the positions are exact.
 */
const researcher = 'tomas.okafor@tacet.example';
const fixture = join(import.meta.dirname, '..', '..', 'fixtures', 'diamond300.csv');

describe('the daily loop of runs', () => {
  const running = useRunningApp();
  let worker: Worker | null = null;
  afterAll(async () => {
    await worker?.close();
  });

  async function startRun(page: Page, fill: (page: Page) => Promise<void>): Promise<string> {
    await page.goto(`${running.baseUrl}/runs/new`);
    await fill(page);
    await page.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    return page.url().split('/').pop()!;
  }

  const statusOf = (page: Page) => page.locator('header:has(h1) [data-status]').getAttribute('data-status');

  it('shows the queue, retries a cancelled run, re-seeds a finished one and opens its settings in the form', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.setViewportSize({ width: 1440, height: 900 });

    const first = await startRun(page, async (p) => {
      await p.getByLabel('N (elements)').fill('150');
      await p.getByLabel('Seed').fill('loop-first');
      await p.getByLabel('Title').fill('Loop first');
      await p.getByLabel('Compute the entanglement entropy of a subregion').check();
      await p.getByLabel('Rényi orders α').fill('2, inf');
      await p.getByLabel('Double truncation').check();
    });
    await expect(page.getByTestId('compute-timing').textContent()).resolves.toBe('queued · next in line');
    const second = await startRun(page, async (p) => {
      await p.getByLabel('N (elements)').fill('120');
      await p.getByLabel('Title').fill('Loop second');
    });
    await expect(page.getByTestId('compute-timing').textContent()).resolves.toBe('queued · 2nd in line');
    await screenshot(page, 'daily-loop-01-queued-1440');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    await screenshot(page, 'daily-loop-02-queued-390');
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBe(0);
    await page.setViewportSize({ width: 1440, height: 900 });

    await page.goto(`${running.baseUrl}/runs`);
    await expect(page.getByTestId(`run-${second}`).getByTestId('compute-timing').textContent()).resolves.toBe('queued · 2nd in line');
    await expect(page.getByTestId(`run-${first}`).getByTestId('compute-timing').textContent()).resolves.toBe('queued · next in line');
    await screenshot(page, 'daily-loop-03-runs-list');

    // a study queued behind them: its first cell waits third, on its page and in the studies list
    const studyId = await page.evaluate(async () => {
      const csrf = decodeURIComponent(document.cookie.split('; ').find((c) => c.startsWith('tacet_csrf='))!.split('=')[1]!);
      const res = await fetch('/api/studies', {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-tacet-csrf': csrf },
        body: JSON.stringify({ title: 'Loop study', counts: [40], seeds: ['s-1', 's-2'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'sqrtN' } }] }),
      });
      return ((await res.json()) as { id: string }).id;
    });
    await page.goto(`${running.baseUrl}/studies/${studyId}`);
    await expect(page.getByTestId('study-progress').getByTestId('compute-timing').textContent()).resolves.toBe('queued · 3rd in line');
    await screenshot(page, 'daily-loop-03b-study-queued');
    await page.goto(`${running.baseUrl}/studies`);
    await expect(page.getByRole('row', { name: /Loop study/ }).getByTestId('compute-timing').textContent()).resolves.toBe('queued · 3rd in line');

    // cancel the second, retry it: a new run that says which it retries, and the cancelled one stays
    await page.goto(`${running.baseUrl}/runs/${second}`);
    await page.getByRole('button', { name: 'Cancel run' }).click();
    await expect.poll(() => statusOf(page)).toBe('cancelled');
    await page.getByRole('button', { name: 'Retry' }).click();
    await page.waitForURL((url) => /\/runs\/[0-9a-f-]{36}$/.test(url.pathname) && !url.pathname.endsWith(second));
    const retried = page.url().split('/').pop()!;
    await page.getByRole('link', { name: `run ${second.slice(0, 8)}` }).waitFor();
    await expect(page.locator('header:has(h1)').textContent()).resolves.toContain(`retry of run ${second.slice(0, 8)}`);

    // a worker now takes the queue: the retry finishes
    worker = await startTestWorker(running.context);
    await page.getByRole('table', { name: 'Diagnostics' }).waitFor({ timeout: 60_000 });
    expect(await statusOf(page)).toBe('done');
    await screenshot(page, 'daily-loop-04-retried-done');

    // same settings, new seed, from the first run once it is done
    await page.goto(`${running.baseUrl}/runs/${first}`);
    await page.getByRole('table', { name: 'Entropy' }).waitFor({ timeout: 60_000 });
    await page.getByRole('button', { name: 'Same settings, new seed' }).click();
    await page.waitForURL((url) => /\/runs\/[0-9a-f-]{36}$/.test(url.pathname) && !url.pathname.endsWith(first));
    const note = page.getByTestId('reseeded-note');
    const seed = (await note.locator('.font-mono').textContent())!;
    expect(seed).toMatch(/^[0-9a-f]{8}$/);
    expect(seed).not.toBe('loop-first');
    await page.getByRole('table', { name: 'Entropy' }).waitFor({ timeout: 60_000 });
    await expect(page.getByRole('table', { name: 'Settings' }).textContent()).resolves.toContain(`${seed} (arc4)`);
    await screenshot(page, 'daily-loop-05-new-seed');

    // open the first run's settings in the form: every field as it was, editable
    await page.goto(`${running.baseUrl}/runs/${first}`);
    await page.getByRole('link', { name: 'Open in the new-run form' }).click();
    await page.waitForURL(`**/runs/new?from=${first}`);
    const form = page.getByRole('form', { name: 'New run' });
    await expect(form.getByLabel('N (elements)').inputValue()).resolves.toBe('150');
    await expect(form.getByLabel('Seed').inputValue()).resolves.toBe('loop-first');
    await expect(form.getByLabel('Title').inputValue()).resolves.toBe('Loop first');
    await expect(form.getByLabel('Compute the entanglement entropy of a subregion').isChecked()).resolves.toBe(true);
    await expect(form.getByLabel('Double truncation').isChecked()).resolves.toBe(true);
    await expect(form.getByLabel('Rényi orders α').inputValue()).resolves.toBe('2, inf');
    await expect(form.getByLabel('past t').inputValue()).resolves.toBe('-0.5');
    await page.getByTestId('from-run-note').waitFor();
    await screenshot(page, 'daily-loop-06-open-in-form');
    await form.getByLabel('N (elements)').fill('160');
    await form.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.getByRole('table', { name: 'Entropy' }).waitFor({ timeout: 60_000 });
    await expect(page.getByRole('table', { name: 'Settings' }).textContent()).resolves.toContain('loop-first');
    expect(retried).not.toBe(second);
    expect(pageErrors).toEqual([]);
  }, 240_000);

  it('starts a run on an imported set from its page with the same form, double truncation on: S above the floor', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.goto(`${running.baseUrl}/causal-sets/import`);
    await page.getByLabel('CSV file').setInputFiles(fixture);
    await page.getByLabel('Name').fill('loop diamond 300');
    await page.getByLabel('Proper time T between the tips').fill(String(2 * Math.SQRT2));
    await page.getByRole('button', { name: 'Import', exact: true }).click();
    await page.waitForURL(/\/causal-sets\/[0-9a-f-]{36}$/);
    const setId = page.url().split('/').pop()!;
    await page.getByRole('link', { name: 'Start a run on this set' }).click();
    await page.waitForURL(`**/runs/new?causalSet=${setId}`);
    const form = page.getByRole('form', { name: 'New run' });
    await expect(form.getByLabel('Use an imported causal set').isChecked()).resolves.toBe(true);
    await form.getByLabel('Compute the entanglement entropy of a subregion').check();
    await expect(form.getByLabel('Double truncation').isChecked()).resolves.toBe(true);
    for (const [label, value] of [['past t', '-0.7071'], ['past x', '0'], ['future t', '0.7071'], ['future x', '0']] as const) await form.getByLabel(label, { exact: true }).fill(value);
    await screenshot(page, 'daily-loop-07-run-on-set-form');
    await form.getByRole('button', { name: 'Start run' }).click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
    await page.getByRole('table', { name: 'Entropy' }).waitFor({ timeout: 60_000 });
    // under double truncation the entropy of a sub-diamond is finite and positive (Sorkin–Yazdi 2018), not the floor of a pure state
    const S = Number(await page.getByTestId('entropy-S').getAttribute('data-value'));
    expect(S).toBeGreaterThan(ENTROPY_FLOOR);
    await expect(page.getByTestId('restricted-cut').textContent()).resolves.toMatch(/√n/);
    await expect(page.locator('header:has(h1)').textContent()).resolves.toContain('loop diamond 300');
    await expect(page.getByTestId('compute-timing').count()).resolves.toBe(0);
    await screenshot(page, 'daily-loop-08-run-on-set-done');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await page.getByRole('table', { name: 'Entropy' }).waitFor();
    await page.waitForTimeout(500);
    await screenshot(page, 'daily-loop-09-run-on-set-390');
    expect(pageErrors).toEqual([]);
  }, 180_000);
});
