#!/usr/bin/env node
// npm start's first step, before anything is installed or started: is each port it needs free, or held
// by this checkout's own service (reused), or by a leftover of an earlier start of this checkout that
// was killed (stopped here), or by something else (named, with the variable that picks another port)?
// Plain Node with no packages, since it runs before `npm install`.
//
//   node scripts/checkPorts.mjs ROOT app:PORT:VARIABLE pg:PORT:VARIABLE redis:PORT:VARIABLE
//
// Prints one line per port that is not simply free; exits 1 when a port is taken by something else.
// Prints `reuse pg` / `reuse redis` on stdout for services of ROOT/.data that are already up.
import { existsSync, readFileSync, readdirSync, readlinkSync } from 'node:fs';
import { resolve } from 'node:path';

const [root, ...specs] = process.argv.slice(2);
if (!root || specs.length === 0) {
  console.error('usage: checkPorts.mjs ROOT name:PORT:VARIABLE ...');
  process.exit(2);
}
const data = resolve(root, '.data');
const services = { app: 'the Tacet web server', pg: 'PostgreSQL', redis: 'Redis' };

/** Socket inodes listening on a TCP port (IPv4 and IPv6), from /proc/net. */
function listeningInodes(port) {
  const inodes = new Set();
  for (const file of ['/proc/net/tcp', '/proc/net/tcp6']) {
    if (!existsSync(file)) continue;
    for (const line of readFileSync(file, 'utf8').split('\n').slice(1)) {
      const fields = line.trim().split(/\s+/);
      if (fields.length < 10) continue;
      const localPort = parseInt(fields[1].split(':').pop(), 16);
      if (localPort === port && fields[3] === '0A') inodes.add(fields[9]);
    }
  }
  return inodes;
}

/** The process holding one of the sockets: pid, command line and working directory (null when unreadable). */
function owner(inodes) {
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    let fds;
    try {
      fds = readdirSync(`/proc/${entry}/fd`);
    } catch {
      continue;
    }
    for (const fd of fds) {
      let target;
      try {
        target = readlinkSync(`/proc/${entry}/fd/${fd}`);
      } catch {
        continue;
      }
      const match = /^socket:\[(\d+)\]$/.exec(target);
      if (!match || !inodes.has(match[1])) continue;
      const read = (what) => {
        try {
          return what === 'cwd' ? readlinkSync(`/proc/${entry}/cwd`) : readFileSync(`/proc/${entry}/cmdline`, 'utf8').split('\0').filter(Boolean).join(' ');
        } catch {
          return '';
        }
      };
      return { pid: Number(entry), command: read('cmdline'), cwd: read('cwd') };
    }
  }
  return null;
}

/** A PostgreSQL server's data directory: the -D argument of the postmaster, or its cwd (postgres runs in it). */
function postgresData(process) {
  const argument = /(?:^|\s)-D\s+(\S+)/.exec(process.command);
  return resolve(process.cwd, argument ? argument[1] : '.');
}

function describe(process) {
  if (!process) return 'a process this user cannot inspect';
  const name = process.command.split(' ')[0].split('/').pop() || 'a process';
  if (/postgres/.test(process.command)) return `PostgreSQL (pid ${process.pid}, data ${postgresData(process)})`;
  if (/redis-server/.test(process.command)) return `Redis (pid ${process.pid}, working in ${process.cwd})`;
  return `${name} (pid ${process.pid}: ${process.command.slice(0, 120)}${process.cwd ? `, in ${process.cwd}` : ''})`;
}

let refused = 0;
for (const spec of specs) {
  const [name, portText, variable] = spec.split(':');
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    console.error(`[start] ${variable}=${portText} is not a port number (1–65535)`);
    refused += 1;
    continue;
  }
  const inodes = listeningInodes(port);
  if (inodes.size === 0) continue;
  const holder = owner(inodes);
  const ours = holder && holder.cwd.startsWith(data);
  if (name === 'pg' && holder && /postgres/.test(holder.command) && postgresData(holder) === resolve(data, 'pg')) {
    console.error(`[start] PostgreSQL of this checkout (.data/pg) is already running on 127.0.0.1:${port}; reusing it`);
    console.log('reuse pg');
    continue;
  }
  if (name === 'redis' && holder && /redis-server/.test(holder.command) && holder.cwd === resolve(data, 'redis')) {
    console.error(`[start] Redis of this checkout (.data/redis) is already running on 127.0.0.1:${port}; reusing it`);
    console.log('reuse redis');
    continue;
  }
  if (name === 'app' && holder && holder.cwd === resolve(root) && /server\/main\.ts/.test(holder.command)) {
    // a web server of this checkout whose `npm start` was killed before it could stop it
    console.error(`[start] a web server left from an earlier start of this checkout holds port ${port} (pid ${holder.pid}); stopping it`);
    try {
      process.kill(holder.pid, 'SIGTERM');
    } catch {
      /* already gone */
    }
    continue;
  }
  const another = holder && /\.data\/(pg|redis)/.test(`${holder.command} ${holder.cwd}`) && !ours ? ' — another checkout of Tacet, it seems' : '';
  console.error(
    `[start] port ${port}, wanted for ${services[name] ?? name}, is taken by ${describe(holder)}${another}.\n` +
      `        Stop that, or choose another port for this checkout: ${variable}=<port> npm start`,
  );
  refused += 1;
}
process.exit(refused > 0 ? 1 : 0);
