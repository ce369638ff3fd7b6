import { mkdirSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll } from 'vitest';
import { createApp } from '../../server/app';
import { demoPassword, seedDemoTeam } from '../../server/db/demo-team';
import type { Worker } from 'bullmq';
import { createTestContext, startTestWorker, type TestContext } from '../support/app';
import { buildClient } from '../support/clientBuild';

const projectRoot = resolve(import.meta.dirname, '../..');
export const screenshotDir = join(projectRoot, 'tests', 'e2e', 'screenshots');

/** Debian's chromium, headless and quiet: no updates, sync or background traffic. */
export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-quic',
      '--no-first-run',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

async function freePort(): Promise<number> {
  const probe = createServer();
  await new Promise<void>((ready) => probe.listen(0, '127.0.0.1', ready));
  const { port } = probe.address() as AddressInfo;
  await new Promise((closed) => probe.close(closed));
  return port;
}

export interface RunningApp {
  baseUrl: string;
  context: TestContext;
  browser: Browser;
  close(): Promise<void>;
}

/**
 * The whole app as a user meets it: the built client and the API on one free loopback port,
 * a migrated database of its own with the demo team seeded, and a browser; with `worker`, a compute
 * worker too (closed by `close()`).
 */
export async function startApp(options: { worker?: boolean } = {}): Promise<RunningApp> {
  mkdirSync(screenshotDir, { recursive: true });
  const [clientDir, port] = await Promise.all([buildClient(), freePort()]);
  const baseUrl = `http://127.0.0.1:${port}`;
  const context = await createTestContext({ port, appUrl: baseUrl });
  await seedDemoTeam(context.dataSource, context.config.bcryptCost);
  const app = createApp({
    config: context.config,
    dataSource: context.dataSource,
    mailer: context.mailer,
    redis: context.redis,
    computeQueue: context.computeQueue,
    clientDir,
  });
  const server: Server = await new Promise((listening) => {
    const s = app.listen(port, '127.0.0.1', () => listening(s));
  });
  const browser = await launchChromium();
  // a compute worker on the same database and queue, for pages that wait for results
  const worker: Worker | null = options.worker ? await startTestWorker(context) : null;
  return {
    baseUrl,
    context,
    browser,
    async close() {
      await worker?.close();
      await browser.close();
      server.closeAllConnections();
      await new Promise((closed) => server.close(closed));
      await context.close();
      await rm(clientDir, { recursive: true, force: true });
    },
  };
}

export function screenshot(page: Page, name: string): Promise<Buffer> {
  return page.screenshot({ path: join(screenshotDir, `${name}.png`), fullPage: true });
}

/** Signs a demo-team member in on a fresh 1280 × 900 context; the start page is the runs table. */
export async function signIn(running: RunningApp, email: string): Promise<Page> {
  const context = await running.browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  await page.goto(`${running.baseUrl}/signin`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/runs');
  return page;
}

/**
 * startApp for a whole test file: started before its tests, closed after them. The value stands for the
 * running app (a stand-in that reads through to it once it has started), so tests write `running.baseUrl`.
 */
export function useRunningApp(options: { worker?: boolean } = {}): RunningApp {
  let started: RunningApp | undefined;
  beforeAll(async () => {
    started = await startApp(options);
  }, 120_000);
  afterAll(async () => {
    await started?.close();
  });
  return new Proxy({} as RunningApp, {
    get(_target, key) {
      if (!started) throw new Error('the app has not started yet: use it inside a test or a later beforeAll');
      return started[key as keyof RunningApp];
    },
  });
}
