import { spawn, spawnSync } from 'node:child_process';
import { closeSync, existsSync, openSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { NearcastError } from '../../src/errors.ts';
import { LIB_DIR } from './fetch-jars.ts';
import { javaCommand } from './preconditions.ts';
import { isBrokerProcess, type BrokerPaths } from './state-dir.ts';

// Starting and ending the broker JVM. The JVM always runs detached (its own session, output to the state
// folder's broker.log) so that whichever process started it — the CLI, the vitest main process or a test
// worker restarting it — may exit without taking the broker along; who ends it is decided by the pid file
// and the lifetime guard, not by process ancestry.

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

function classpath(): string {
  return path.join(LIB_DIR, '*'); // one argv element: the JVM expands the wildcard itself
}

function jvmOptions(paths: BrokerPaths, heapMb: number): string[] {
  return [
    `-Xms${Math.min(128, heapMb)}m`,
    `-Xmx${heapMb}m`,
    '-XX:+ExitOnOutOfMemoryError',
    '-Djava.awt.headless=true',
    `-Dlog4j.configuration=file:${paths.log4jProperties}`,
  ];
}

/** Writes the KRaft bootstrap metadata into an empty data folder (what bin/kafka-storage.sh format does). */
export function formatStorage(paths: BrokerPaths, clusterId: string): void {
  const run = spawnSync(
    javaCommand(),
    [...jvmOptions(paths, 256), '-cp', classpath(), 'kafka.tools.StorageTool', 'format', '-t', clusterId, '-c', paths.serverProperties],
    { encoding: 'utf8', timeout: 120_000 },
  );
  if (run.status !== 0) {
    const output = `${run.stdout ?? ''}${run.stderr ?? ''}`.trim() || run.error?.message || 'no output';
    throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`formatting the broker storage in ${paths.dataDir} failed: ${output}`]);
  }
}

/** Spawns `java kafka.Kafka server.properties` detached, appending its output to broker.log; returns its pid. */
export function spawnBroker(paths: BrokerPaths, heapMb: number): number {
  const out = openSync(paths.logFile, 'a');
  try {
    const child = spawn(javaCommand(), [...jvmOptions(paths, heapMb), '-cp', classpath(), 'kafka.Kafka', paths.serverProperties], {
      cwd: paths.dir,
      detached: true,
      stdio: ['ignore', out, out],
    });
    child.once('error', () => undefined); // reported through the missing pid below or the readiness wait
    child.unref();
    if (child.pid === undefined) throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`could not start "${javaCommand()}"`]);
    return child.pid;
  } finally {
    closeSync(out);
  }
}

/** Waits until pid is no longer our broker; true when it went within timeoutMs. */
export async function waitForExit(pid: number, paths: BrokerPaths, timeoutMs: number): Promise<boolean> {
  const deadline = performance.now() + timeoutMs;
  while (isBrokerProcess(pid, paths)) {
    if (performance.now() > deadline) return false;
    await sleep(100);
  }
  return true;
}

/** SIGTERM (Kafka shuts down cleanly, flushing logs), then SIGKILL if it has not gone after graceMs. */
export async function terminate(pid: number, paths: BrokerPaths, graceMs: number): Promise<'stopped' | 'killed'> {
  if (!signal(pid, 'SIGTERM')) return 'stopped';
  if (await waitForExit(pid, paths, graceMs)) return 'stopped';
  await killNow(pid, paths);
  return 'killed';
}

/** SIGKILL outright: no shutdown hooks, no flush — what a crash or an OOM killer does. */
export async function killNow(pid: number, paths: BrokerPaths): Promise<void> {
  signal(pid, 'SIGKILL');
  if (!(await waitForExit(pid, paths, 10_000))) {
    throw new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`the broker JVM (pid ${pid}) survived SIGKILL for 10 s`]);
  }
}

function signal(pid: number, sig: NodeJS.Signals): boolean {
  try {
    process.kill(pid, sig);
    return true;
  } catch {
    return false; // already gone
  }
}

/** The last lines of broker.log, for error messages. */
export function logTail(paths: BrokerPaths, lines = 20): string {
  if (!existsSync(paths.logFile)) return '(no broker.log)';
  const text = readFileSync(paths.logFile, 'utf8').trimEnd().split('\n');
  return text.slice(-lines).join('\n');
}
