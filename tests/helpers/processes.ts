// Process trees from /proc (Linux): the fault tests and the benchmarks kill or measure a process
// together with the children it started (tsx launchers, sandboxed BullMQ processors).
import fs from 'node:fs';

/** Every process below `pid`, children first. */
export function descendants(pid: number): number[] {
  const parent = new Map<number, number>();
  for (const d of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${d}/stat`, 'utf8');
      // the field after the command name "(…)" is the state, then the parent id
      parent.set(Number(d), Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]));
    } catch {
      /* the process ended meanwhile */
    }
  }
  const out: number[] = [];
  const walk = (p: number) => {
    for (const [c, pp] of parent) {
      if (pp === p) {
        walk(c);
        out.push(c);
      }
    }
  };
  walk(pid);
  return out;
}
