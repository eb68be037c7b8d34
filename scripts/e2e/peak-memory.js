#!/usr/bin/env node
// Runs a command and reports the peak memory of its whole process tree
// (code-server, extension hosts, Chromium and its renderers included), which
// `time -v` cannot: it reports only the largest single process.
// Usage: node scripts/e2e/peak-memory.js <command> [args...]
'use strict';
const { spawn } = require('child_process');
const fs = require('fs');

const [command, ...args] = process.argv.slice(2);
if (!command) {
  console.error('usage: peak-memory.js <command> [args...]');
  process.exit(2);
}

function tree(root) {
  const children = new Map();
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      if (!children.has(ppid)) children.set(ppid, []);
      children.get(ppid).push(Number(entry));
    } catch {
      // exited while we were reading
    }
  }
  const found = [root];
  for (let i = 0; i < found.length; i++) found.push(...(children.get(found[i]) ?? []));
  return found;
}

// PSS shares each page among the processes that map it, so Chromium's many
// processes are not counted once per process as a plain RSS sum would.
function memoryKb(pid) {
  try {
    const rollup = fs.readFileSync(`/proc/${pid}/smaps_rollup`, 'utf8');
    const field = (name) => Number((rollup.match(new RegExp(`^${name}:\\s+(\\d+) kB`, 'm')) ?? [])[1] ?? 0);
    return { rss: field('Rss'), pss: field('Pss') };
  } catch {
    return { rss: 0, pss: 0 };
  }
}

const started = Date.now();
const child = spawn(command, args, { stdio: 'inherit' });
const peak = { pss: 0, rss: 0, processes: 0 };
const timer = setInterval(() => {
  const pids = tree(child.pid);
  let pss = 0;
  let rss = 0;
  for (const pid of pids) {
    const m = memoryKb(pid);
    pss += m.pss;
    rss += m.rss;
  }
  peak.pss = Math.max(peak.pss, pss);
  peak.rss = Math.max(peak.rss, rss);
  peak.processes = Math.max(peak.processes, pids.length);
}, 500);

child.on('exit', (code, sig) => {
  clearInterval(timer);
  const mib = (kb) => (kb / 1024).toFixed(0);
  console.error(
    `peak-memory: ${((Date.now() - started) / 1000).toFixed(1)} s wall, peak PSS ${mib(peak.pss)} MiB, ` +
      `peak RSS sum ${mib(peak.rss)} MiB, up to ${peak.processes} processes`,
  );
  process.exit(code ?? (sig ? 1 : 0));
});
