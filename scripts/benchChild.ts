import { spawn } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const repositoryRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/**
 * Runs a bench module again as a fresh child process (`node --import tsx FILE --child ARGS…`) and
 * returns the rows it prints as JSON on its last stdout line. A fresh process per size keeps each
 * peak-RSS figure its own, not inherited from an earlier, larger run.
 */
export function runBenchChild<T>(file: string, args: string[], what: string): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', file, '--child', ...args], {
      cwd: repositoryRoot,
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let out = '';
    child.stdout.on('data', (chunk: Buffer) => (out += chunk.toString()));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) return reject(new Error(`${what} exited with ${code}`));
      resolve(JSON.parse(out.trim().split('\n').at(-1) as string) as T[]);
    });
  });
}
