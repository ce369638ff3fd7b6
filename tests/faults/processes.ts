import { spawn, type ChildProcess } from 'node:child_process';
import { projectRoot } from '../../server/config';

/** A real `tsx` process of ours (worker or API) with its output kept for assertions. */
export interface Spawned {
  child: ChildProcess;
  output(): string;
  /** resolves when the output contains `text` */
  waitFor(text: string | RegExp, timeoutMs?: number): Promise<void>;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

export function spawnTsx(script: string, env: Record<string, string>): Spawned {
  // node with the tsx loader, not the tsx wrapper: the wrapper would run the script in a child
  // process, and a SIGKILL sent to the wrapper would leave that child running
  const child = spawn(process.execPath, ['--import', 'tsx', script], {
    cwd: projectRoot,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let text = '';
  const waiters: { match: string | RegExp; resolve: () => void }[] = [];
  const matches = (m: string | RegExp) => (typeof m === 'string' ? text.includes(m) : m.test(text));
  const onData = (chunk: Buffer) => {
    text += chunk.toString();
    for (const w of waiters.splice(0)) (matches(w.match) ? w.resolve : () => waiters.push(w))();
  };
  child.stdout!.on('data', onData);
  child.stderr!.on('data', onData);
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.on('exit', (code, signal) => resolve({ code, signal })),
  );
  return {
    child,
    output: () => text,
    exited,
    waitFor(match, timeoutMs = 30_000) {
      if (matches(match)) return Promise.resolve();
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no "${match}" within ${timeoutMs} ms; output:\n${text}`)), timeoutMs);
        waiters.push({ match, resolve: () => (clearTimeout(timer), resolve()) });
        void exited.then(() => setTimeout(() => reject(new Error(`process exited before "${match}"; output:\n${text}`)), 50));
      });
    },
  };
}

/** Stops a spawned process if it still runs (tests clean up after themselves). */
export async function stopProcess(p: Spawned | null | undefined): Promise<void> {
  if (!p || p.child.exitCode !== null || p.child.signalCode !== null) return;
  p.child.kill('SIGKILL');
  await p.exited;
}
