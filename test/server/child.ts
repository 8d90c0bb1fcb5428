/** Runs src/server/main.ts as a child process, with bounded waits for its output and exit. */
import { type ChildProcess, spawn } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const MAIN = join(ROOT, 'src', 'server', 'main.ts');
/** Upper bound for a child to start or stop; a guard against hanging, not a speed check. */
export const WAIT_MS = 20_000;
/** A first start with the demo also computes 90 days of rounds and their server findings. */
export const SEED_WAIT_MS = 60_000;

export interface Child {
  process: ChildProcess;
  stdout: () => string;
  stderr: () => string;
}

export function spawnMain(env: Record<string, string>): Child {
  const childEnv: NodeJS.ProcessEnv = { ...process.env };
  for (const name of Object.keys(childEnv)) {
    if (name === 'PORT' || name === 'HOST' || name.startsWith('CRANKHOUSE_')) delete childEnv[name];
  }
  const child = spawn(process.execPath, ['--import', 'tsx', MAIN], {
    cwd: ROOT,
    env: { ...childEnv, CRANKHOUSE_DEMO: '0', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stdout?.on('data', (chunk: Buffer) => {
    out += chunk.toString();
  });
  child.stderr?.on('data', (chunk: Buffer) => {
    err += chunk.toString();
  });
  return { process: child, stdout: () => out, stderr: () => err };
}

export function waitForOutput(child: Child, pattern: RegExp, waitMs = WAIT_MS): Promise<RegExpMatchArray> {
  return new Promise((resolve, reject) => {
    const check = (): void => {
      const match = child.stdout().match(pattern);
      if (match) {
        finish();
        resolve(match);
      }
    };
    const onExit = (code: number | null): void => {
      finish();
      reject(new Error(`server exited (${code}) before printing ${pattern}: ${child.stdout()} ${child.stderr()}`));
    };
    const timer = setTimeout(() => {
      finish();
      reject(new Error(`no ${pattern} within ${waitMs} ms: ${child.stdout()} ${child.stderr()}`));
    }, waitMs);
    const finish = (): void => {
      clearTimeout(timer);
      child.process.stdout?.off('data', check);
      child.process.off('exit', onExit);
    };
    child.process.stdout?.on('data', check);
    child.process.once('exit', onExit);
    check();
  });
}

export function waitForExit(child: Child): Promise<{ code: number | null; signal: NodeJS.Signals | null }> {
  const proc = child.process;
  if (proc.exitCode !== null || proc.signalCode !== null) {
    return Promise.resolve({ code: proc.exitCode, signal: proc.signalCode });
  }
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not exit within ${WAIT_MS} ms`)), WAIT_MS);
    proc.once('exit', (code, signal) => {
      clearTimeout(timer);
      resolve({ code, signal });
    });
  });
}

export function killIfRunning(child: Child): void {
  if (child.process.exitCode === null && child.process.signalCode === null) child.process.kill('SIGKILL');
}
