import { spawn, type ChildProcess } from 'node:child_process';
import type { Socket } from 'node:net';
import { pidState, type BrokerPaths } from './state-dir.ts';

// Ties a broker's life to the process that owns it (the vitest main process, or any program that calls
// startLocalBroker), so no JVM outlives the tests however the owner ends:
//  - on a normal exit or process.exit(), an 'exit' hook SIGKILLs the broker the pid file names;
//  - on a crash, SIGKILL or a terminal's Ctrl-C, the hook never runs, so a small detached shell watchdog
//    holds a pipe from the owner: when the owner dies the pipe reaches end-of-file and the watchdog kills
//    the broker. It reads the pid file only then, so a broker restarted meanwhile by a test worker (a new
//    pid) is covered too, and it checks the command line first so a reused pid is never hit.

const WATCHDOG_SCRIPT = [
  'read -r _',
  'pid=$(cat "$1" 2>/dev/null) || exit 0',
  'case "$(ps -ww -p "$pid" -o args= 2>/dev/null)" in *kafka.Kafka*"$2"*) kill -9 "$pid" ;; esac',
].join('\n');

export interface LifetimeGuard {
  /** Stops guarding (after a deliberate stop); the broker, if still running, is then left alone. */
  dispose(): void;
}

export function guardBrokerLifetime(paths: BrokerPaths): LifetimeGuard {
  const onExit = () => {
    const state = pidState(paths);
    if (state.kind === 'running') {
      try {
        process.kill(state.pid, 'SIGKILL');
      } catch {
        // already gone
      }
    }
  };
  process.on('exit', onExit);
  const watchdog = startWatchdog(paths);
  let disposed = false;
  return {
    dispose() {
      if (disposed) return;
      disposed = true;
      process.off('exit', onExit);
      watchdog?.kill('SIGKILL');
    },
  };
}

function startWatchdog(paths: BrokerPaths): ChildProcess | undefined {
  if (process.platform === 'win32') return undefined;
  const child = spawn('sh', ['-c', WATCHDOG_SCRIPT, 'nearcast-broker-watchdog', paths.pidFile, paths.serverProperties], {
    // Its own session: a Ctrl-C that reaches the owner's process group must not end the watchdog too.
    detached: true,
    stdio: ['pipe', 'ignore', 'ignore'],
  });
  child.once('error', () => undefined); // no sh: the exit hook still covers normal exits
  child.unref();
  (child.stdin as Socket | null)?.unref();
  return child;
}
