/**
 * `npm run bench`: imports every module in scripts/bench/*.ts, each exporting
 * `async function benchRows(): Promise<object[]>`, and prints one JSON document `{ rows: [...] }` on
 * stdout (progress goes to stderr). Speed and memory targets live in these modules, not in tests.
 */
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const benchDir = path.join(path.dirname(fileURLToPath(import.meta.url)), 'bench');
// the load test runs last: it keeps both cores busy, and the 1-minute load average it leaves behind
// would put the native backend's thread policy on one thread for the compute rows after it
const runLast = (name: string) => (name === 'load.ts' ? 1 : 0);
const modules = readdirSync(benchDir)
  .filter((name) => name.endsWith('.ts'))
  .sort((a, b) => runLast(a) - runLast(b) || a.localeCompare(b));

const rows: object[] = [];
for (const name of modules) {
  const mod = (await import(pathToFileURL(path.join(benchDir, name)).href)) as { benchRows?: () => Promise<object[]> };
  if (typeof mod.benchRows !== 'function') throw new Error(`scripts/bench/${name} does not export benchRows()`);
  process.stderr.write(`bench: ${name}\n`);
  rows.push(...(await mod.benchRows()));
}
process.stdout.write(JSON.stringify({ rows }, null, 2) + '\n');
