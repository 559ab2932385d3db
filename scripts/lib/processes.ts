// Small process helpers shared by the start, test and e2e scripts: run a command, spawn a service and wait
// until it answers, stop what was started.
import { spawn, spawnSync, type ChildProcess, type SpawnOptions } from 'node:child_process';
import net from 'node:net';

export const ROOT = new URL('../..', import.meta.url).pathname.replace(/\/$/, '');

/** Runs a command to completion with inherited output; returns its exit code. */
export function run(cmd: string, args: string[], options: SpawnOptions = {}): number {
  const result = spawnSync(cmd, args, { stdio: 'inherit', cwd: ROOT, ...options });
  if (result.error) throw result.error;
  return result.status ?? 1;
}

/** Runs a command and returns its trimmed standard output, or throws with its standard error. */
export function capture(cmd: string, args: string[], options: SpawnOptions = {}): string {
  const result = spawnSync(cmd, args, { cwd: ROOT, encoding: 'utf8', ...options });
  if (result.status !== 0) throw new Error(String(result.stderr || result.stdout || `${cmd} failed`).trim());
  return String(result.stdout).trim();
}

/** True when something accepts TCP connections on host:port. */
export function isPortOpen(host: string, port: number, timeoutMs = 500): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = net.connect({ host, port });
    const done = (open: boolean) => {
      socket.destroy();
      resolve(open);
    };
    socket.setTimeout(timeoutMs, () => done(false));
    socket.once('connect', () => done(true));
    socket.once('error', () => done(false));
  });
}

/** Finds a free TCP port on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() =>
        typeof address === 'object' && address ? resolve(address.port) : reject(new Error('no port')),
      );
    });
  });
}

/** Polls `check` until it returns true or `timeoutMs` passes. */
export async function waitFor(check: () => Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check().catch(() => false)) return;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`${what} did not come up within ${Math.round(timeoutMs / 1000)} s`);
}

/** Starts a long-running child; its output goes to ours with a prefix. */
export function startService(
  name: string,
  cmd: string,
  args: string[],
  env: NodeJS.ProcessEnv,
  quiet = false,
): ChildProcess {
  const child = spawn(cmd, args, { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
  const prefix = (chunk: Buffer) =>
    chunk
      .toString()
      .split('\n')
      .filter(Boolean)
      .map((l) => `[${name}] ${l}`)
      .join('\n') + '\n';
  child.stdout?.on('data', (c: Buffer) => {
    if (!quiet) process.stdout.write(prefix(c));
  });
  child.stderr?.on('data', (c: Buffer) => process.stderr.write(prefix(c)));
  return child;
}

/** Sends SIGTERM, then SIGKILL after `graceMs` if the child has not exited. */
export async function stopService(child: ChildProcess | undefined, graceMs = 5_000): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  child.kill('SIGTERM');
  const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
  await exited;
  clearTimeout(timer);
}

/** Answers true when `url` returns HTTP 200. */
export async function httpOk(url: string): Promise<boolean> {
  const res = await fetch(url, { signal: AbortSignal.timeout(2_000) });
  return res.status === 200;
}
