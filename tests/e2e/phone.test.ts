import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoPassword } from '../../server/db/demo-team';
import { demoRuns, queueDemoWork } from '../../server/demoWork';
import { screenshot, startApp, type RunningApp } from './browser';

// Issue 18 §3: at 390 × 844 every page fits the screen (wide tables scroll inside their own box) and the
// header does not overlap itself. The demo team's work gives the run, study and compare pages content.
let running: RunningApp;
let page: Page;

beforeAll(async () => {
  running = await startApp({ worker: true });
  await queueDemoWork(running.context.dataSource, running.context.computeQueue);
  const ds = running.context.dataSource;
  const deadline = Date.now() + 240_000;
  for (;;) {
    const [{ open }] = await ds.query(
      "SELECT (SELECT count(*) FROM runs WHERE status IN ('queued','running')) + (SELECT count(*) FROM studies WHERE status IN ('queued','running'))::int AS open",
    );
    if (Number(open) === 0 || Date.now() > deadline) break;
    await new Promise((r) => setTimeout(r, 1000));
  }
  const context = await running.browser.newContext({ viewport: { width: phoneWidth, height: 844 }, deviceScaleFactor: 1, hasTouch: true, isMobile: true });
  page = await context.newPage();
  await page.goto(`${running.baseUrl}/signin`);
  await page.getByLabel('E-mail').fill('tomas.okafor@tacet.example');
  await page.getByLabel('Password').fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/runs');
}, 300_000);
afterAll(async () => {
  await running?.close();
});

/**
 * How far the page reaches beyond the 390 px screen (0 when it fits). A phone browser widens its layout
 * to the widest element (innerWidth then grows with it), so the page is measured against the screen.
 */
const phoneWidth = 390;
const overflow = (p: Page) => p.evaluate((screen) => Math.max(document.documentElement.scrollWidth, window.innerWidth) - screen, phoneWidth);

/** The innermost elements reaching past the screen's right edge, to name in a failure. */
const widest = (p: Page) =>
  p.evaluate((screen) => {
    const out: string[] = [];
    for (const el of Array.from(document.querySelectorAll('body *'))) {
      const r = el.getBoundingClientRect();
      if (r.right <= screen + 1 || r.width === 0) continue;
      if (Array.from(el.children).some((c) => c.getBoundingClientRect().right > screen + 1)) continue;
      let clipped = false;
      for (let a = el.parentElement; a; a = a.parentElement) if (getComputedStyle(a).overflowX !== 'visible' && a.getBoundingClientRect().right <= screen + 1) clipped = true;
      if (!clipped) out.push(`${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)} “${(el.textContent ?? '').trim().slice(0, 40)}” → ${Math.round(r.right)}`);
    }
    return out.slice(0, 6);
  }, phoneWidth);

async function visit(path: string, name: string, ready: (p: Page) => Promise<unknown>) {
  await page.goto(`${running.baseUrl}${path}`);
  await ready(page);
  await page.waitForTimeout(300);
  await screenshot(page, `phone-${name}`);
  return overflow(page);
}

describe('every page at phone size', () => {
  it('the header keeps its parts apart', async () => {
    await page.goto(`${running.baseUrl}/runs`);
    await page.getByRole('navigation', { name: 'Main' }).waitFor();
    const boxes = await Promise.all(
      [page.getByRole('link', { name: 'Tacet', exact: true }), page.getByTestId('current-team'), page.getByRole('navigation', { name: 'Main' })].map((l) => l.boundingBox()),
    );
    const [brand, team, nav] = boxes.map((b) => b!);
    const overlaps = (a: typeof brand, b: typeof brand) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
    expect(overlaps(brand, team)).toBe(false);
    expect(overlaps(brand, nav)).toBe(false);
    expect(overlaps(team, nav)).toBe(false);
  });

  it('lists, forms and result pages fit 390 px', async () => {
    const runId: string = (await running.context.dataSource.query('SELECT id FROM runs WHERE title = $1', [demoRuns[0].title]))[0].id;
    const otherId: string = (await running.context.dataSource.query('SELECT id FROM runs WHERE title = $1', [demoRuns[1].title]))[0].id;
    const studyId: string = (await running.context.dataSource.query('SELECT id FROM studies LIMIT 1'))[0].id;
    const heading = (text: string | RegExp) => (p: Page) => p.getByRole('heading', { name: text }).first().waitFor();
    const pages: [string, string, (p: Page) => Promise<unknown>][] = [
      ['/runs', 'runs', heading('Runs')],
      ['/runs/new', 'new-run', heading(/New run|New vacuum run/)],
      [`/runs/${runId}`, 'run', (p) => p.getByText('Entropy').first().waitFor()],
      [`/runs/compare?ids=${runId},${otherId}`, 'compare', heading(/Compare/)],
      ['/studies', 'studies', heading('Studies')],
      ['/studies/new', 'new-study', heading(/New study|New scaling study/)],
      [`/studies/${studyId}`, 'study', (p) => p.getByText('Fits').first().waitFor()],
      ['/causal-sets', 'causal-sets', heading('Causal sets')],
      ['/causal-sets/import', 'import', heading(/Import/)],
      ['/cut-rules', 'cut-rules', heading('Cut rules')],
      ['/team', 'team', heading(/Halvorsen|Team/)],
      ['/account', 'account', heading('Account')],
    ];
    const wide: Record<string, string> = {};
    for (const [path, name, ready] of pages) {
      const beyond = await visit(path, name, ready);
      if (beyond > 0) wide[name] = `${beyond} px too wide: ${(await widest(page)).join(' | ')}`;
    }
    expect(wide).toEqual({});
  }, 180_000);
});
