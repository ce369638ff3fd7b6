#!/usr/bin/env node
// Builds the optional native linear-algebra addon (native/ → native/build/Release/tacet_linalg.node)
// with the node-gyp that ships inside npm, against Node's own installed headers (never downloads them),
// linked to Debian's OpenBLAS (libopenblas-dev; node-gyp also needs python3, make and g++).
//
//   node scripts/build-native.mjs             build when sources changed; exit 1 with the reason on failure
//   node scripts/build-native.mjs --force     rebuild even when the addon is up to date
//   node scripts/build-native.mjs --optional  as used by postinstall: on failure log why and exit 0,
//                                             so that the install always succeeds and the engine falls
//                                             back to its pure-JavaScript backend
// TACET_SKIP_NATIVE_BUILD=1 skips the build (the engine then uses ml-matrix).
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const nativeDir = path.join(root, 'native');
const addonPath = path.join(nativeDir, 'build', 'Release', 'tacet_linalg.node');
const args = new Set(process.argv.slice(2));
const optional = args.has('--optional');
const force = args.has('--force');

function log(message) {
  console.log(`[build-native] ${message}`);
}

function giveUp(reason) {
  const fallback = 'the engine will use its pure-JavaScript (ml-matrix) backend';
  if (optional) {
    log(`native addon not built: ${reason}; ${fallback}`);
    process.exit(0);
  }
  console.error(`[build-native] failed: ${reason}`);
  process.exit(1);
}

/** node-gyp as shipped by npm: npm passes its path to scripts; otherwise look beside npm itself. */
function findNodeGyp() {
  const candidates = [];
  if (process.env.npm_config_node_gyp) candidates.push(process.env.npm_config_node_gyp);
  if (process.env.npm_execpath) {
    candidates.push(path.join(path.dirname(process.env.npm_execpath), '..', 'node_modules', 'node-gyp', 'bin', 'node-gyp.js'));
  }
  const prefix = path.resolve(path.dirname(process.execPath), '..');
  candidates.push(path.join(prefix, 'lib', 'node_modules', 'npm', 'node_modules', 'node-gyp', 'bin', 'node-gyp.js'));
  candidates.push('/usr/share/nodejs/node-gyp/bin/node-gyp.js', '/usr/lib/node_modules/node-gyp/bin/node-gyp.js');
  return candidates.find((c) => existsSync(c));
}

/** A directory holding include/node/node_api.h for the running Node, so node-gyp never downloads headers. */
function findNodeDir() {
  const candidates = [];
  if (process.env.npm_config_nodedir) candidates.push(process.env.npm_config_nodedir);
  candidates.push(path.resolve(path.dirname(process.execPath), '..'), '/usr', '/usr/local');
  return candidates.find((dir) => existsSync(path.join(dir, 'include', 'node', 'node_api.h')));
}

function newestSourceTime() {
  const files = [path.join(nativeDir, 'binding.gyp')];
  for (const name of readdirSync(path.join(nativeDir, 'src'))) files.push(path.join(nativeDir, 'src', name));
  return Math.max(...files.map((f) => statSync(f).mtimeMs));
}

/** Loads the addon in a fresh process, which also proves that libopenblas resolves at run time. */
function smokeTest() {
  const script = `const a = require(${JSON.stringify(addonPath)}); const r = a.gram(2, 1, new Float64Array([3, 4]));
    if (r[0] !== 25) throw new Error('gram gave ' + r[0]); console.log(a.info().blasConfig);`;
  return spawnSync(process.execPath, ['-e', script], { encoding: 'utf8' });
}

if (process.env.TACET_SKIP_NATIVE_BUILD === '1') giveUp('TACET_SKIP_NATIVE_BUILD=1');
if (!existsSync(path.join(nativeDir, 'binding.gyp'))) giveUp(`${path.join(nativeDir, 'binding.gyp')} is missing`);

if (!force && existsSync(addonPath) && statSync(addonPath).mtimeMs >= newestSourceTime()) {
  const check = smokeTest();
  if (check.status === 0) {
    log(`up to date: ${path.relative(root, addonPath)} (${check.stdout.trim()})`);
    process.exit(0);
  }
  log('existing addon does not load; rebuilding');
}

try {
  createRequire(path.join(root, 'package.json')).resolve('node-addon-api');
} catch {
  giveUp('the node-addon-api package is not installed (run npm install)');
}
const nodeGyp = findNodeGyp();
if (!nodeGyp) giveUp('node-gyp was not found (it ships with npm; is npm installed?)');
const nodeDir = findNodeDir();
if (!nodeDir) giveUp(`Node's headers (include/node/node_api.h) were not found beside ${process.execPath}`);

log(`building with ${nodeGyp} against headers in ${nodeDir}/include/node`);
const build = spawnSync(process.execPath, [nodeGyp, 'rebuild', `--nodedir=${nodeDir}`], {
  cwd: nativeDir,
  encoding: 'utf8',
  env: { ...process.env, npm_config_nodedir: nodeDir },
});
if (build.status !== 0) {
  const output = `${build.stdout ?? ''}${build.stderr ?? ''}`;
  const lines = output.split('\n').filter((l) => /error|not found|No such file|cannot find/i.test(l));
  let hint = '';
  if (/cblas\.h|lopenblas/.test(output)) hint = ' (install Debian package libopenblas-dev)';
  else if (/make: not found|g\+\+: not found|not found: make|gyp ERR! stack Error: not found/.test(output)) {
    hint = ' (install make and g++, e.g. Debian package build-essential)';
  }
  console.error(lines.slice(0, 12).join('\n') || output.slice(-2000));
  giveUp(`node-gyp exited with ${build.status ?? build.signal}${hint}`);
}
const check = smokeTest();
if (check.status !== 0) giveUp(`the built addon does not load: ${check.stderr.trim().split('\n').slice(0, 5).join(' ')}`);
log(`built ${path.relative(root, addonPath)} (${check.stdout.trim()})`);
