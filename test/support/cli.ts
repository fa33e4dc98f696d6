/**
 * Spawning the real command line from the repository root, for the cross-package tests.
 * The CLI runs from its bundle (packages/cli/bin/twinfet.js -> bundle, made from dist by the
 * vitest global set-up, test/support/bundle.ts): run `npx tsc -b` first.
 */
import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/** The repository root (this file is test/support/cli.ts). */
export const REPO_ROOT = fileURLToPath(new URL('../../', import.meta.url));
/** The CLI entry, relative to the repository root. */
export const CLI = 'packages/cli/bin/twinfet.js';

/** What one CLI process did. */
export interface CliResult {
  readonly args: readonly string[];
  /** Exit code, or null when the process was ended by a signal. */
  readonly code: number | null;
  readonly signal: NodeJS.Signals | null;
  readonly stdout: string;
  readonly stderr: string;
  /** Wall time from spawn to exit, ms (reported in failure messages only, never asserted). */
  readonly ms: number;
}

/** Options of {@link runCli}. */
export interface RunCliOptions {
  /** Extra environment variables (added to this process's environment). */
  readonly env?: Readonly<Record<string, string>>;
  /** Kill the process after this long (a hang guard, not a speed check), ms; default 120 s. */
  readonly timeoutMs?: number;
  /** Called once the process has started, with the child (to send it signals). */
  readonly onSpawn?: (child: import('node:child_process').ChildProcess) => void;
  /** Options for node itself, before the CLI entry (e.g. `--import` of a test probe). */
  readonly nodeArgs?: readonly string[];
  /** Called with all of stderr so far each time more arrives (to react to what the child reports). */
  readonly onStderr?: (text: string, child: import('node:child_process').ChildProcess) => void;
}

/** Runs `node packages/cli/bin/twinfet.js ...args` from the repository root. */
export function runCli(args: readonly string[], options: RunCliOptions = {}): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const started = performance.now();
    const child = spawn(process.execPath, [...(options.nodeArgs ?? []), CLI, ...args], {
      cwd: REPO_ROOT,
      env: { ...process.env, ...options.env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.setEncoding('utf8').on('data', (s: string) => (stdout += s));
    child.stderr.setEncoding('utf8').on('data', (s: string) => {
      stderr += s;
      options.onStderr?.(stderr, child);
    });
    const timer = setTimeout(() => child.kill('SIGKILL'), options.timeoutMs ?? 120_000);
    child.on('error', (e) => {
      clearTimeout(timer);
      reject(e);
    });
    child.on('close', (code, signal) => {
      clearTimeout(timer);
      resolve({ args, code, signal, stdout, stderr, ms: performance.now() - started });
    });
    options.onSpawn?.(child);
  });
}

/** Maps `items` through `fn` with at most `limit` running at once, keeping the order. */
export async function mapLimit<T, R>(items: readonly T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const lane = async (): Promise<void> => {
    while (next < items.length) {
      const i = next++;
      out[i] = await fn(items[i]!);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, items.length)) }, lane));
  return out;
}
