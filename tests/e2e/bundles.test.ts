import { readFile } from 'node:fs/promises';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { demoPassword } from '../../server/db/demo-team';
import { screenshot, signIn, useRunningApp } from './browser';
import { waitForRun, waitUntil } from '../worker/runHelpers';

const researcher = 'tomas.okafor@tacet.example';

/** The zip's local file headers (PK\x03\x04): one per file, as the download counts them. */
const filesIn = (zip: Buffer) => {
  let count = 0;
  for (let i = zip.indexOf('PK\u0003\u0004', 0, 'latin1'); i >= 0; i = zip.indexOf('PK\u0003\u0004', i + 4, 'latin1')) count++;
  return count;
};

describe('supplementary bundles in the browser', () => {
  const running = useRunningApp({ worker: true });

  it('downloads a study bundle and the bundle of ticked runs, with the files counted', async () => {
    const login = await request(running.context.app).post('/api/auth/login').send({ email: researcher, password: demoPassword });
    expect(login.status).toBe(200);
    const auth = { Authorization: `Bearer ${login.body.token}` };
    const study = await request(running.context.app)
      .post('/api/studies')
      .set(auth)
      .send({ title: 'Bundle in the browser', counts: [100], seeds: ['e-1', 'e-2'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'sqrtN' }, doubleTruncation: true }] });
    expect(study.status, JSON.stringify(study.body)).toBe(202);
    const run = await request(running.context.app)
      .post('/api/runs')
      .set(auth)
      .send({ title: 'bundled in the browser', sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, count: 120, seed: 'e2e' }, truncation: { rule: 'sqrtN' }, subregion: { kind: 'diamond', past: { t: -0.4, x: 0 }, future: { t: 0.4, x: 0 } }, doubleTruncation: true });
    expect(run.status).toBe(202);
    await waitUntil(async () => (await request(running.context.app).get(`/api/studies/${study.body.id}`).set(auth)).body.status as string, (s) => s === 'done', 90_000);
    await waitForRun(running.context.app, login.body.token, run.body.id, (r) => r.status === 'done', 60_000);

    const page = await signIn(running, researcher);
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await page.goto(`${running.baseUrl}/studies/${study.body.id}`);
    const studyBundle = page.getByTestId('study-bundle');
    await studyBundle.waitFor();
    const [studyDownload] = await Promise.all([page.waitForEvent('download'), studyBundle.getByRole('button', { name: 'Supplementary bundle (zip)' }).click()]);
    expect(studyDownload.suggestedFilename()).toBe(`tacet-study-${study.body.id.slice(0, 8)}-bundle.zip`);
    const studyZip = await readFile((await studyDownload.path())!);
    // README, 6 exports, 4 figures, points and spectrum of 2 sprinklings, manifest.json
    expect(filesIn(studyZip)).toBe(16);
    await expect(page.getByTestId('study-bundle-progress').textContent()).resolves.toMatch(/^Saved: 16 of 16 files, (\d+ kB|\d+\.\d MB)$/);
    await studyBundle.scrollIntoViewIfNeeded();
    await screenshot(page, 'bundle-01-study');

    await page.goto(`${running.baseUrl}/runs`);
    const runsBundle = page.getByTestId('runs-bundle');
    await expect(runsBundle.getByRole('button', { name: 'Supplementary bundle (zip)' }).isDisabled()).resolves.toBe(true);
    await page.getByLabel('Compare bundled in the browser').check();
    const [runsDownload] = await Promise.all([page.waitForEvent('download'), runsBundle.getByRole('button', { name: 'Supplementary bundle (zip)' }).click()]);
    expect(runsDownload.suggestedFilename()).toBe('tacet-runs-1-bundle.zip');
    // README, points and two spectra, two tables, methods, BibTeX, 4 figures, manifest.json
    expect(filesIn(await readFile((await runsDownload.path())!))).toBe(13);
    await expect(page.getByTestId('runs-bundle-progress').textContent()).resolves.toMatch(/^Saved: 13 of 13 files/);
    await screenshot(page, 'bundle-02-runs');
    expect(pageErrors).toEqual([]);
  }, 240_000);
});
