import { readFile } from 'node:fs/promises';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { csrfCookieName, csrfHeaderName } from '@shared/headers';
import { formatEntropy } from '@shared/precision';
import type { RunDetail } from '@shared/runs';
import { runPython } from '../support/python';
import { screenshot, signIn, useRunningApp } from './browser';

const researcher = 'tomas.okafor@tacet.example';

/** Two runs on the same diamond and subregion that differ only in their seed, posted with the page's own session. */
async function postRun(page: Page, baseUrl: string, seed: string, title: string): Promise<string> {
  const csrf = (await page.context().cookies()).find((c) => c.name === csrfCookieName)!.value;
  const res = await page.request.post(`${baseUrl}/api/runs`, {
    headers: { [csrfHeaderName]: csrf },
    data: {
      title,
      sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 160, seed },
      truncation: { rule: 'sqrtN' },
      subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
      doubleTruncation: true,
      renyi: [2],
    },
  });
  expect(res.status(), await res.text()).toBe(202);
  return ((await res.json()) as { id: string }).id;
}

async function waitDone(page: Page, baseUrl: string, id: string): Promise<RunDetail> {
  for (let attempt = 0; attempt < 180; attempt++) {
    const run = (await (await page.request.get(`${baseUrl}/api/runs/${id}`)).json()) as RunDetail;
    if (run.status === 'done') return run;
    if (run.status === 'failed' || run.status === 'cancelled') throw new Error(`run ${id} ended ${run.status}: ${run.error}`);
    await page.waitForTimeout(500);
  }
  throw new Error(`run ${id} did not finish`);
}

describe('comparing runs in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('compares two runs by entropy, shows the differing seed, keeps the selection on reload and downloads the data', async () => {
    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    const first = await postRun(page, running.baseUrl, 'compare-seed-one', 'Compare one');
    const second = await postRun(page, running.baseUrl, 'compare-seed-two', 'Compare two');
    const runs = [await waitDone(page, running.baseUrl, first), await waitDone(page, running.baseUrl, second)];

    // the runs list's Compare button leads to the selection in the URL
    await page.goto(`${running.baseUrl}/runs`);
    await page.getByTestId(`run-${second}`).waitFor();
    await page.getByRole('checkbox', { name: 'Compare Compare one' }).check();
    await page.getByRole('checkbox', { name: 'Compare Compare two' }).check();
    await page.getByRole('button', { name: /Compare/ }).click();
    await page.waitForURL(`**/runs/compare?ids=${first},${second}`);

    const check = async () => {
      const table = page.getByRole('table', { name: 'Compared entropies' });
      await table.waitFor();
      for (const run of runs) {
        const row = page.getByTestId(`entropy-${run.id}`);
        await expect(row.textContent()).resolves.toContain(formatEntropy(run.result!.entropy!.S));
        await expect(row.textContent()).resolves.toContain(formatEntropy(run.result!.entropy!.renyi!['2']!));
      }
      const figure = page.getByRole('figure', { name: 'Compared entropies' });
      await figure.locator('.scatterlayer .trace').first().waitFor();
      // S and S_2, each with a point per run
      await expect(figure.locator('.scatterlayer .trace').count()).resolves.toBe(2);
      await expect(figure.locator('.scatterlayer .trace').first().locator('.point').count()).resolves.toBe(2);
      // the two runs differ in their seed alone
      const differs = page.getByRole('table', { name: 'Settings that differ' });
      await expect(differs.locator('tbody tr').count()).resolves.toBe(1);
      await expect(page.getByTestId('differs-seed').textContent()).resolves.toMatch(/Seed.*compare-seed-one.*compare-seed-two/);
      await page.getByRole('figure', { name: 'Compared spectra' }).locator('.scatterlayer .trace').first().waitFor();
    };
    await check();
    await screenshot(page, 'compare-01-entropy-1440');

    await page.reload();
    expect(page.url()).toContain(`/runs/compare?ids=${first},${second}`);
    await check();

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Compared runs (CSV)' }).click()]);
    expect(download.suggestedFilename()).toBe(`tacet-compare-${first.slice(0, 4)}-${second.slice(0, 4)}.csv`);
    // Python's csv module reads the file (the region and subregion cells are quoted, they hold commas)
    const [columns, ...rows] = runPython<string[][]>('import csv, io, json, sys\nprint(json.dumps(list(csv.reader(io.StringIO(json.load(sys.stdin))))))', await readFile((await download.path())!, 'utf8'));
    expect(rows).toHaveLength(2);
    expect(rows.map((r) => r[columns!.indexOf('seed')])).toEqual(['compare-seed-one', 'compare-seed-two']);
    expect(rows.map((r) => Number(r[columns!.indexOf('S')]))).toEqual(runs.map((r) => r.result!.entropy!.S));
    expect(rows.map((r) => Number(r[columns!.indexOf('S_alpha_2')]))).toEqual(runs.map((r) => r.result!.entropy!.renyi!['2']));
    const [json] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Compared runs (JSON)' }).click()]);
    const compared = JSON.parse(await readFile((await json.path())!, 'utf8')) as { runs: string[] };
    expect(compared.runs).toEqual([first, second]);

    // leaving a run out rewrites the URL, so one run is left and the page asks for another
    await page.getByRole('button', { name: 'Leave Compare two out of the comparison' }).click();
    await page.waitForURL(`**/runs/compare?ids=${first}`);
    await page.getByText(/one run is left in this selection/).waitFor();
    expect(pageErrors).toEqual([]);
    await page.context().close();
  });

  it('reads at 1440 px and 390 px, and the run page copies its numbers as LaTeX', async () => {
    const page = await signIn(running, researcher);
    await page.context().grantPermissions(['clipboard-read', 'clipboard-write'], { origin: running.baseUrl });
    const list = (await (await page.request.get(`${running.baseUrl}/api/runs?search=Compare`)).json()) as { items: { id: string; title: string }[] };
    const ids = list.items.filter((r) => r.title.startsWith('Compare ')).map((r) => r.id).sort();
    expect(ids).toHaveLength(2);

    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/runs/compare?runs=${ids.join(',')}`);
    await page.getByRole('figure', { name: 'Compared entropies' }).locator('.scatterlayer .trace').first().waitFor();
    await screenshot(page, 'compare-02-1440');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${running.baseUrl}/runs/compare?runs=${ids.join(',')}`);
    await page.getByRole('figure', { name: 'Compared entropies' }).locator('.scatterlayer .trace').first().waitFor();
    await page.waitForTimeout(300);
    await screenshot(page, 'compare-03-390');
    // nothing wider than the phone but the tables' own scrolling boxes; a failure names the elements that reach past it
    const reach = await page.evaluate(() => {
      const out: string[] = [];
      for (const el of Array.from(document.querySelectorAll('body *'))) {
        const r = el.getBoundingClientRect();
        if (r.right <= 391 || r.width === 0) continue;
        if (Array.from(el.children).some((c) => c.getBoundingClientRect().right > 391)) continue;
        let clipped = false;
        for (let a = el.parentElement; a; a = a.parentElement) if (getComputedStyle(a).overflowX !== 'visible' && a.getBoundingClientRect().right <= 391) clipped = true;
        if (!clipped) out.push(`${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)} “${(el.textContent ?? '').trim().slice(0, 40)}” → ${Math.round(r.right)}`);
      }
      return { width: document.documentElement.scrollWidth, widest: out.slice(0, 6) };
    });
    expect(reach.width, reach.widest.join('; ')).toBeLessThanOrEqual(390);

    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${running.baseUrl}/runs/${ids[0]}`);
    await page.getByRole('button', { name: 'Copy LaTeX' }).click();
    await page.getByTestId('copy-latex').getByText('Copied').waitFor();
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    const run = (await (await page.request.get(`${running.baseUrl}/api/runs/${ids[0]}`)).json()) as RunDetail;
    expect(copied).toContain('\\begin{tabular}{ll}');
    expect(copied).toContain(`$S$ & $${formatEntropy(run.result!.entropy!.S, 'latex')}$ \\\\`);
    // the same text as the numbers.tex download
    const tex = await (await page.request.get(`${running.baseUrl}/api/runs/${ids[0]}/numbers.tex`)).text();
    expect(copied).toBe(tex);
    await screenshot(page, 'compare-04-run-copy-latex');
    await page.context().close();
  });
});
