import { isNearcastError } from '../../src/errors.ts';
import {
  killLocalBroker, launchLocalBroker, localBrokerStatus, restartLocalBroker, stopLocalBroker,
  type BrokerTimings, type LaunchedBroker,
} from './broker-lifecycle.ts';
import { ensureBrokerJars, LIB_DIR } from './fetch-jars.ts';
import { guardBrokerLifetime, type LifetimeGuard } from './lifetime-guard.ts';
import { brokerPaths, readPidFile } from './state-dir.ts';

// A real Apache Kafka broker (KRaft, one combined broker/controller on 127.0.0.1) from Maven Central jars:
// in-process owners (the vitest global setup) use startLocalBroker; the CLI uses runBrokerCommand.

export {
  killLocalBroker, launchLocalBroker, localBrokerStatus, restartLocalBroker, stopLocalBroker,
  type BrokerStatus, type BrokerTimings, type LaunchedBroker, type LaunchOptions,
} from './broker-lifecycle.ts';
export { ensureBrokerJars, brokerJarsPresent, pinnedKafkaVersion } from './fetch-jars.ts';
export { BROKER_ALTERNATIVES, javaProblem, mavenProblem } from './preconditions.ts';
export { warmUpBroker, waitUntilAnswering } from './warm-up.ts';

export interface StartLocalBrokerOptions {
  readonly port?: number;
  readonly controllerPort?: number;
  readonly dir: string;
  readonly heapMb?: number;
  /** Kill a broker left over from an earlier run of this folder and start on empty data. */
  readonly fresh?: boolean;
}

export interface LocalBroker {
  /** Bootstrap address for kafkajs, "127.0.0.1:port". Unchanged by restarts. */
  readonly brokers: string;
  /** The JVM's pid now (a restart gives a new one). */
  readonly pid: number;
  readonly dir: string;
  readonly pidFile: string;
  /** Timings of the latest start. */
  readonly timings: BrokerTimings;
  /** Graceful stop; the broker is no longer guarded afterwards. */
  stop(): Promise<void>;
  /** SIGKILL outright; call restart() to bring it back on the same data and ports. */
  kill(): Promise<void>;
  /** Stops it if running, then starts it again on the same data and ports, and warms it up. */
  restart(): Promise<void>;
}

/**
 * Starts a broker owned by this process: it is killed when this process exits, however it exits, unless
 * stop() was called first.
 */
export async function startLocalBroker(opts: StartLocalBrokerOptions): Promise<LocalBroker> {
  const paths = brokerPaths(opts.dir);
  let guard: LifetimeGuard | undefined = guardBrokerLifetime(paths);
  let latest: LaunchedBroker;
  try {
    latest = await launchLocalBroker({ ...opts, ownerPid: process.pid });
  } catch (err) {
    guard.dispose();
    throw err;
  }
  return {
    brokers: latest.brokers,
    dir: paths.dir,
    pidFile: paths.pidFile,
    get pid() {
      return readPidFile(paths) ?? latest.pid;
    },
    get timings() {
      return latest.timings;
    },
    async stop() {
      await stopLocalBroker(paths.dir);
      guard?.dispose();
      guard = undefined;
    },
    async kill() {
      await killLocalBroker(paths.dir);
    },
    async restart() {
      guard ??= guardBrokerLifetime(paths);
      latest = await restartLocalBroker(paths.dir);
    },
  };
}

const ACTIONS = ['fetch', 'start', 'stop', 'status', 'restart', 'kill'] as const;

/** `nearcast broker <action>`; returns the exit code (status: 0 running, 3 not running, as LSB init scripts do). */
export async function runBrokerCommand(action: string, opts: { port: number; dir: string }): Promise<number> {
  try {
    switch (action) {
      case 'fetch': {
        const r = await ensureBrokerJars();
        const what = r.fetched ? `fetched ${r.jarCount} jars in ${seconds(r.elapsedMs)}` : `already present (${r.jarCount} jars)`;
        console.log(`Kafka ${r.kafkaVersion} broker jars ${what}: ${LIB_DIR}`);
        return 0;
      }
      case 'start': {
        const status = localBrokerStatus(opts.dir);
        if (status.running) {
          console.log(`already running: brokers ${status.brokers ?? '?'} (pid ${status.pid}, state in ${status.dir})`);
          return 0;
        }
        printStarted(await launchLocalBroker({ dir: opts.dir, port: opts.port, ownerPid: null }));
        return 0;
      }
      case 'restart': {
        const status = localBrokerStatus(opts.dir);
        const started = status.brokers === undefined
          ? await launchLocalBroker({ dir: opts.dir, port: opts.port, ownerPid: null })
          : await restartLocalBroker(opts.dir);
        printStarted(started);
        return 0;
      }
      case 'stop': {
        const how = await stopLocalBroker(opts.dir);
        console.log(how === 'not-running' ? `no broker running from ${brokerPaths(opts.dir).dir}` : `broker ${how} (data kept in ${brokerPaths(opts.dir).dir})`);
        return 0;
      }
      case 'kill': {
        const how = await killLocalBroker(opts.dir);
        console.log(how === 'killed' ? 'broker killed with SIGKILL (data kept; `nearcast broker restart` brings it back)' : `no broker running from ${brokerPaths(opts.dir).dir}`);
        return 0;
      }
      case 'status': {
        const s = localBrokerStatus(opts.dir);
        if (s.running) {
          console.log(`running: brokers ${s.brokers ?? '?'}, pid ${s.pid}, Kafka ${s.kafkaVersion ?? '?'}, state in ${s.dir}`);
          return 0;
        }
        const stale = s.stalePid !== undefined ? ` (removed stale pid file naming pid ${s.stalePid})` : '';
        if (s.stalePid !== undefined) await stopLocalBroker(opts.dir); // only clears the stale file
        console.log(`not running${stale}; state in ${s.dir}`);
        return 3;
      }
      default:
        console.error(`unknown broker action "${action}"; use one of: ${ACTIONS.join(', ')}`);
        return 2;
    }
  } catch (err) {
    console.error(isNearcastError(err) ? `${err.code}: ${err.message}` : `broker ${action} failed: ${(err as Error).stack ?? String(err)}`);
    return 1;
  }
}

function printStarted(b: LaunchedBroker): void {
  console.log(`Kafka ${b.kafkaVersion} broker running: brokers ${b.brokers} (pid ${b.pid}, state in ${b.dir})`);
  console.log(`  answered after ${seconds(b.timings.answeringMs)}, warm-up (topic, group, transaction) ${seconds(b.timings.warmUpMs)}`);
  console.log(`  use it with KAFKA_BROKERS=${b.brokers}; stop it with: nearcast broker stop`);
}

function seconds(ms: number): string {
  return `${(ms / 1000).toFixed(1)} s`;
}
