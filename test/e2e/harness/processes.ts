import * as fs from 'fs';

// code-server forks an extension host, a pty host and watchers into its own
// process group, but terminals it opens call setsid and leave that group, so
// a group kill alone could leave shells behind. Walking /proc finds them all.

/** Every live descendant of `root` (not `root` itself), read from /proc. */
export function descendants(root: number): number[] {
  const children = new Map<number, number[]>();
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    const ppid = parentOf(Number(entry));
    if (ppid === undefined) continue;
    const list = children.get(ppid) ?? [];
    list.push(Number(entry));
    children.set(ppid, list);
  }
  const found: number[] = [];
  const queue = [root];
  while (queue.length > 0) {
    for (const child of children.get(queue.shift()!) ?? []) {
      found.push(child);
      queue.push(child);
    }
  }
  return found;
}

function parentOf(pid: number): number | undefined {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    // The command name (field 2) may hold spaces or parentheses; fields after its last ')' are fixed.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return Number(fields[1]);
  } catch {
    return undefined; // exited while we were reading
  }
}

export function isAlive(pid: number): boolean {
  try {
    const state = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    // A zombie has exited; only its parent's wait() is missing.
    return state.slice(state.lastIndexOf(')') + 2, state.lastIndexOf(')') + 3) !== 'Z';
  } catch {
    return false;
  }
}

export function signal(pids: Iterable<number>, sig: NodeJS.Signals): void {
  for (const pid of pids) {
    try {
      process.kill(pid, sig);
    } catch {
      // already gone
    }
  }
}

export function signalGroup(pgid: number, sig: NodeJS.Signals): void {
  try {
    process.kill(-pgid, sig);
  } catch {
    // group already empty
  }
}

export function groupMembers(pgid: number): number[] {
  const members: number[] = [];
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      if (Number(fields[2]) === pgid && fields[0] !== 'Z') members.push(Number(entry));
    } catch {
      // exited while we were reading
    }
  }
  return members;
}

export function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** Live processes whose command line contains `text` (e.g. a unique temp folder). */
export function processesMentioning(text: string): number[] {
  const found: number[] = [];
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry) || Number(entry) === process.pid) continue;
    try {
      if (fs.readFileSync(`/proc/${entry}/cmdline`, 'utf8').includes(text) && isAlive(Number(entry))) found.push(Number(entry));
    } catch {
      // exited while we were reading
    }
  }
  return found;
}
