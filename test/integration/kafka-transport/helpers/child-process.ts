import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Config } from '../../../../src/config/config.ts';

// Runs the sensing stage in a child process (so it can be SIGKILLed like a failing machine) and follows its
// stdout event lines.

const CHILD = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'sensing-child.ts');

export interface SensingChild {
  readonly process: ChildProcess;
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  readonly events: Record<string, unknown>[];
  ready(): Promise<void>;
  terminate(): Promise<void>;
  kill(): Promise<void>;
}

export function startSensingChild(config: Config, env: Record<string, string> = {}): SensingChild {
  const child = spawn(process.execPath, ['--import', 'tsx', CHILD], {
    env: { ...process.env, NEARCAST_TEST_CONFIG: JSON.stringify(config), ...env },
    stdio: ['ignore', 'pipe', process.env.NEARCAST_TEST_LOG_LEVEL ? 'inherit' : 'ignore'],
  });
  const events: Record<string, unknown>[] = [];
  let buffer = '';
  const waiters: (() => void)[] = [];
  child.stdout!.on('data', (chunk: Buffer) => {
    buffer += chunk.toString('utf8');
    let nl;
    while ((nl = buffer.indexOf('\n')) >= 0) {
      const line = buffer.slice(0, nl);
      buffer = buffer.slice(nl + 1);
      try {
        events.push(JSON.parse(line) as Record<string, unknown>);
      } catch {
        continue;
      }
      for (const w of waiters.splice(0)) w();
    }
  });
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.once('exit', (code, signal) => resolve({ code, signal })));
  return {
    process: child,
    exited,
    events,
    async ready() {
      await Promise.race([
        new Promise<void>((resolve) => {
          const check = () => (events.some((e) => e.ready) ? resolve() : waiters.push(check));
          check();
        }),
        exited.then((e) => {
          if (!events.some((ev) => ev.ready)) throw new Error(`the sensing child exited before it was ready (${e.code ?? e.signal})`);
        }),
      ]);
    },
    async terminate() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
      await exited;
    },
    async kill() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
      await exited;
    },
  };
}
