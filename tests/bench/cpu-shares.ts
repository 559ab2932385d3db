// Where a machine's CPU went during a benchmark run, by process group, read from Linux's /proc (proc(5)): the
// utime and stime of every process, in clock ticks (100 per second on Linux, sysconf(_SC_CLK_TCK)), and the idle
// time of the whole machine from /proc/stat. Shows whether a load run had a core to spare. Linux only: elsewhere
// the snapshot is empty and the figures say so.
import { readdirSync, readFileSync } from 'node:fs';

const TICKS_PER_SECOND = 100;

export type CpuGroup = 'app' | 'postgres' | 'bench' | 'other';

interface Snapshot {
  at: number;
  ticks: Map<number, { group: CpuGroup; ticks: number }>;
  idleTicks: number;
  totalTicks: number;
}

function read(file: string): string | null {
  try {
    return readFileSync(file, 'utf8');
  } catch {
    return null;
  }
}

function groupOf(pid: number, cmdline: string): CpuGroup {
  if (pid === process.pid) return 'bench';
  if (cmdline.includes('serve.mjs')) return 'app';
  if (cmdline.startsWith('postgres')) return 'postgres';
  return 'other';
}

export function takeCpuSnapshot(): Snapshot {
  const ticks = new Map<number, { group: CpuGroup; ticks: number }>();
  let names: string[] = [];
  try {
    names = readdirSync('/proc');
  } catch {
    /* not Linux */
  }
  for (const name of names) {
    const pid = Number(name);
    if (!Number.isInteger(pid)) continue;
    const stat = read(`/proc/${pid}/stat`);
    const cmdline = read(`/proc/${pid}/cmdline`);
    if (stat === null || cmdline === null) continue;
    // Fields after the command name in parentheses: state is field 3, utime 14 and stime 15 (proc(5)).
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    ticks.set(pid, {
      group: groupOf(pid, cmdline.replace(/\0/g, ' ')),
      ticks: Number(fields[11]) + Number(fields[12]),
    });
  }
  // /proc/stat's first line: user nice system idle iowait irq softirq steal … in ticks, for all cores together.
  const cpuLine = (read('/proc/stat') ?? '').split('\n')[0]!.trim().split(/\s+/).slice(1, 9).map(Number);
  const idleTicks = (cpuLine[3] ?? 0) + (cpuLine[4] ?? 0);
  const totalTicks = cpuLine.reduce((a, b) => a + b, 0);
  return { at: performance.now(), ticks, idleTicks, totalTicks };
}

/**
 * Cores kept busy on average between two snapshots, per group, the machine's idle share (null off Linux), and how
 * many processes of each group were running at the end.
 */
export function cpuBetween(before: Snapshot, after: Snapshot) {
  const seconds = (after.at - before.at) / 1000;
  const busy: Record<CpuGroup, number> = { app: 0, postgres: 0, bench: 0, other: 0 };
  const processes: Record<CpuGroup, number> = { app: 0, postgres: 0, bench: 0, other: 0 };
  for (const [pid, now] of after.ticks) {
    busy[now.group] += now.ticks - (before.ticks.get(pid)?.ticks ?? 0);
    processes[now.group] += 1;
  }
  const r2 = (v: number) => Math.round(v * 100) / 100;
  const total = after.totalTicks - before.totalTicks;
  return {
    coresBusy: Object.fromEntries(
      Object.entries(busy).map(([group, t]) => [group, r2(t / TICKS_PER_SECOND / seconds)]),
    ) as Record<CpuGroup, number>,
    machineIdle: total > 0 ? r2((after.idleTicks - before.idleTicks) / total) : null,
    /** Processes of each group alive at the end (the app's include its supervisor). */
    processes,
  };
}
