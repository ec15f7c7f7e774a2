import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { NearcastError } from '../../src/errors.ts';
import { log4jProperties, serverProperties } from './broker-config.ts';
import { ensureBrokerJars } from './fetch-jars.ts';
import { formatStorage, killNow, logTail, spawnBroker, terminate } from './jvm-process.ts';
import { freePort, javaProblem, portProblem, preconditionError, validPort } from './preconditions.ts';
import {
  brokerPaths, isBrokerProcess, pidState, processAlive, readMeta, removePidFile, writeMeta, writePidFile,
  type BrokerMeta, type BrokerPaths,
} from './state-dir.ts';
import { waitUntilAnswering, warmUpBroker } from './warm-up.ts';

// Start, stop, kill and restart one broker, addressed only by its state folder. None of these ties the
// broker to the calling process (see lifetime-guard.ts for that), so the CLI can daemonise it and a test
// worker can restart a broker that the vitest main process owns.

export interface LaunchOptions {
  readonly dir: string;
  /** Client port on 127.0.0.1; default: the port of the last run from this folder, else a free one. */
  readonly port?: number;
  readonly controllerPort?: number;
  /** Maximum JVM heap; default 512 MB. */
  readonly heapMb?: number;
  /** Kill any broker left running from this folder and delete its data first. */
  readonly fresh?: boolean;
  /** Process that guards the broker's lifetime; null for a daemon; undefined keeps what the folder says. */
  readonly ownerPid?: number | null;
  /** Per phase (answering, warm-up); default 120 s, since a 2-core CI machine is slow on a cold JVM. */
  readonly readyTimeoutMs?: number;
  /** How long to wait for taken ports to come free before refusing; default 0 (refuse at once). */
  readonly portWaitMs?: number;
}

/**
 * A JVM that was just killed can still hold its sockets for a moment after it stops looking like our broker (the
 * kernel may release a dying process's memory, and with it the command line we check, before it closes its files;
 * seen as EADDRINUSE on both ports of a restart on a loaded machine). A restart on the same ports waits for them.
 */
const RESTART_PORT_WAIT_MS = 15_000;

/** What keeps the two ports from being listened on, polled until both are free or `waitMs` has passed. */
export async function portProblemsOf(port: number, controllerPort: number, waitMs: number): Promise<string[]> {
  const deadline = performance.now() + waitMs;
  for (;;) {
    const problems = (await Promise.all([portProblem(port, 'client'), portProblem(controllerPort, 'controller')])).filter((p) => p !== undefined);
    if (problems.length === 0 || performance.now() >= deadline) return problems;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

export interface BrokerTimings {
  readonly fetchMs: number;
  readonly formatMs: number;
  /** From spawning the JVM until it answered a metadata request. */
  readonly answeringMs: number;
  readonly warmUpMs: number;
}

export interface LaunchedBroker {
  readonly brokers: string;
  readonly pid: number;
  readonly port: number;
  readonly controllerPort: number;
  readonly dir: string;
  readonly kafkaVersion: string;
  readonly timings: BrokerTimings;
}

const DEFAULT_HEAP_MB = 512;
const DEFAULT_READY_TIMEOUT_MS = 120_000;

export async function launchLocalBroker(opts: LaunchOptions): Promise<LaunchedBroker> {
  const paths = brokerPaths(opts.dir);
  const heapMb = opts.heapMb ?? DEFAULT_HEAP_MB;
  const bad = [
    ...(opts.port !== undefined && !validPort(opts.port) ? [`port must be an integer from 1 to 65535, got ${opts.port}`] : []),
    ...(opts.controllerPort !== undefined && !validPort(opts.controllerPort) ? [`controllerPort must be an integer from 1 to 65535, got ${opts.controllerPort}`] : []),
    ...(!Number.isInteger(heapMb) || heapMb < 128 ? [`heapMb must be an integer of at least 128, got ${heapMb}`] : []),
  ];
  if (bad.length > 0) throw new NearcastError('NEARCAST_BROKER_PRECONDITION', bad);
  const java = javaProblem();
  if (java) throw preconditionError([java]);
  const fetch = await ensureBrokerJars();

  mkdirSync(paths.dir, { recursive: true });
  await clearPidFile(paths, opts.fresh === true);
  if (opts.fresh) for (const p of [paths.dataDir, paths.metaFile, paths.logFile]) rmSync(p, { recursive: true, force: true });
  const previous = readMeta(paths);

  const port = opts.port ?? previous?.port ?? (await freePort());
  let controllerPort = opts.controllerPort ?? previous?.controllerPort ?? (await freePort());
  while (controllerPort === port) controllerPort = await freePort();
  const portProblems = await portProblemsOf(port, controllerPort, opts.portWaitMs ?? 0);
  if (portProblems.length > 0) throw preconditionError(portProblems);

  writeFileSync(paths.serverProperties, serverProperties({ port, controllerPort, dataDir: paths.dataDir }));
  writeFileSync(paths.log4jProperties, log4jProperties());
  const formatStarted = performance.now();
  let clusterId = formattedClusterId(paths);
  if (clusterId === undefined) {
    clusterId = newClusterId();
    formatStorage(paths, clusterId);
  }
  const formatMs = performance.now() - formatStarted;
  const meta: BrokerMeta = {
    kafkaVersion: fetch.kafkaVersion, clusterId, port, controllerPort, heapMb,
    ownerPid: opts.ownerPid === undefined ? previous?.ownerPid ?? null : opts.ownerPid,
  };
  writeMeta(paths, meta);

  const brokers = `127.0.0.1:${port}`;
  const spawned = performance.now();
  const pid = spawnBroker(paths, heapMb);
  writePidFile(paths, pid);
  const timeoutMs = opts.readyTimeoutMs ?? DEFAULT_READY_TIMEOUT_MS;
  try {
    await waitUntilAnswering(brokers, {
      timeoutMs,
      abortReason: () => (isBrokerProcess(pid, paths) ? undefined : `the broker JVM (pid ${pid}) exited during start-up`),
    });
    const answered = performance.now();
    await warmUpBroker(brokers, { timeoutMs });
    const timings = { fetchMs: fetch.elapsedMs, formatMs, answeringMs: answered - spawned, warmUpMs: performance.now() - answered };
    return { brokers, pid, port, controllerPort, dir: paths.dir, kafkaVersion: fetch.kafkaVersion, timings };
  } catch (err) {
    await killNow(pid, paths).catch(() => undefined);
    removePidFile(paths);
    const message = err instanceof NearcastError ? err.details.join('; ') : (err as Error).message;
    throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`${message}; last lines of ${paths.logFile}:\n${logTail(paths)}`], { cause: err });
  }
}

/** Graceful stop (SIGTERM, SIGKILL after graceMs). Data and ports stay for a later start or restart. */
export async function stopLocalBroker(dir: string, { graceMs = 30_000 } = {}): Promise<'stopped' | 'killed' | 'not-running'> {
  const paths = brokerPaths(dir);
  const state = pidState(paths);
  const outcome = state.kind === 'running' ? await terminate(state.pid, paths, graceMs) : 'not-running';
  removePidFile(paths);
  return outcome;
}

/** SIGKILL outright, as a crash would; the data stays, so restartLocalBroker brings it back. */
export async function killLocalBroker(dir: string): Promise<'killed' | 'not-running'> {
  const paths = brokerPaths(dir);
  const state = pidState(paths);
  if (state.kind === 'running') await killNow(state.pid, paths);
  removePidFile(paths);
  return state.kind === 'running' ? 'killed' : 'not-running';
}

/** Stops the broker if it runs (gracefully) and starts it again on the same data and the same ports. */
export async function restartLocalBroker(dir: string, opts: { readyTimeoutMs?: number } = {}): Promise<LaunchedBroker> {
  const paths = brokerPaths(dir);
  const meta = readMeta(paths);
  if (!meta || formattedClusterId(paths) === undefined) {
    throw new NearcastError('NEARCAST_BROKER_PRECONDITION', [`no broker has run from ${paths.dir} yet, so there is nothing to restart; start one first`]);
  }
  await stopLocalBroker(dir);
  return launchLocalBroker({ dir, port: meta.port, controllerPort: meta.controllerPort, heapMb: meta.heapMb, portWaitMs: RESTART_PORT_WAIT_MS, ...opts });
}

export interface BrokerStatus {
  readonly running: boolean;
  readonly pid?: number;
  readonly brokers?: string;
  readonly dir: string;
  /** The pid file named a process that is gone (or is no longer our broker). */
  readonly stalePid?: number;
  readonly ownerPid?: number | null;
  readonly ownerAlive?: boolean;
  readonly kafkaVersion?: string;
}

export function localBrokerStatus(dir: string): BrokerStatus {
  const paths = brokerPaths(dir);
  const state = pidState(paths);
  const meta = readMeta(paths);
  const owner = meta?.ownerPid ?? null;
  return {
    dir: paths.dir,
    running: state.kind === 'running',
    ...(state.kind === 'running' ? { pid: state.pid } : {}),
    ...(state.kind === 'stale' ? { stalePid: state.pid } : {}),
    ...(meta ? { brokers: `127.0.0.1:${meta.port}`, kafkaVersion: meta.kafkaVersion, ownerPid: owner } : {}),
    ...(owner !== null ? { ownerAlive: processAlive(owner) } : {}),
  };
}

/** Removes a stale pid file; a live broker is an error unless `fresh` says to kill it (a leftover). */
async function clearPidFile(paths: BrokerPaths, fresh: boolean): Promise<void> {
  const state = pidState(paths);
  if (state.kind === 'running') {
    if (!fresh) {
      const meta = readMeta(paths);
      const where = meta ? ` on 127.0.0.1:${meta.port}` : '';
      throw new NearcastError('NEARCAST_BROKER_PRECONDITION', [
        `a broker from ${paths.dir} is already running (pid ${state.pid}${where}); stop it first (nearcast broker stop --dir ${paths.dir})`,
      ]);
    }
    await killNow(state.pid, paths);
  }
  removePidFile(paths);
}

/** The cluster id in data/meta.properties when the storage is formatted, else undefined. */
function formattedClusterId(paths: BrokerPaths): string | undefined {
  const file = path.join(paths.dataDir, 'meta.properties');
  if (!existsSync(file)) return undefined;
  return /^cluster\.id=(.+)$/m.exec(readFileSync(file, 'utf8'))?.[1]?.trim();
}

/**
 * A Kafka Uuid: 16 random bytes, base64url, no padding. One in 64 of those starts with '-', which the storage tool's
 * argument parser reads as an option ("--cluster-id: expected one argument"); Kafka's own generator draws again in
 * that case (recalled from memory of its Uuid class), and so do we.
 */
export function newClusterId(random: (n: number) => Buffer = randomBytes): string {
  for (;;) {
    const id = random(16).toString('base64url');
    if (!id.startsWith('-')) return id;
  }
}
