import { execFile } from 'node:child_process';
import { createServer, type Server } from 'node:net';
import { resolve } from 'node:path';
import { promisify } from 'node:util';
import { afterEach, describe, expect, it } from 'vitest';

// scripts/checkPorts.mjs is npm start's first step: it must name a taken port, what holds it and the
// variable that moves this checkout elsewhere, and pass free ports silently.
const run = promisify(execFile);
const root = resolve(__dirname, '../..');
const script = resolve(root, 'scripts/checkPorts.mjs');

async function check(...specs: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('node', [script, root, ...specs]);
    return { code: 0, stdout, stderr };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

function listen(): Promise<{ server: Server; port: number }> {
  return new Promise((done) => {
    const server = createServer();
    server.listen(0, '127.0.0.1', () => done({ server, port: (server.address() as { port: number }).port }));
  });
}

let held: Server | null = null;
afterEach(() => {
  held?.close();
  held = null;
});

describe('npm start port check', () => {
  it('refuses a port held by another program, naming the program and the variable to change', async () => {
    const { server, port } = await listen();
    held = server;
    const result = await check(`pg:${port}:TACET_PG_PORT`);
    expect(result.code).toBe(1);
    expect(result.stderr).toContain(`port ${port}, wanted for PostgreSQL, is taken by`);
    expect(result.stderr).toContain(`pid ${process.pid}`);
    expect(result.stderr).toContain('TACET_PG_PORT=<port> npm start');
  });

  it('passes free ports without a word', async () => {
    const { server, port } = await listen();
    await new Promise((done) => server.close(done));
    const result = await check(`app:${port}:TACET_PORT`, `redis:${port}:TACET_REDIS_PORT`);
    expect(result).toMatchObject({ code: 0, stdout: '', stderr: '' });
  });

  it('refuses a value that is not a port', async () => {
    const result = await check('app:99999:TACET_PORT');
    expect(result.code).toBe(1);
    expect(result.stderr).toContain('TACET_PORT=99999 is not a port number');
  });
});
