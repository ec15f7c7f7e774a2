import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import { NearcastError } from '../../src/errors.ts';

// Everything one local broker owns lives in one state folder: its data, config, log, pid file and the
// ports it was given (so a restart comes back on the same address). Any process that knows the folder
// can stop, kill or restart the broker — the vitest main process and its workers both use that.

export interface BrokerPaths {
  readonly dir: string;
  readonly dataDir: string;
  readonly pidFile: string;
  readonly metaFile: string;
  readonly serverProperties: string;
  readonly log4jProperties: string;
  readonly logFile: string;
}

export function brokerPaths(dir: string): BrokerPaths {
  const abs = path.resolve(dir);
  return {
    dir: abs,
    dataDir: path.join(abs, 'data'),
    pidFile: path.join(abs, 'broker.pid'),
    metaFile: path.join(abs, 'broker.json'),
    serverProperties: path.join(abs, 'server.properties'),
    log4jProperties: path.join(abs, 'log4j.properties'),
    logFile: path.join(abs, 'broker.log'),
  };
}

const metaSchema = z.object({
  kafkaVersion: z.string(),
  clusterId: z.string().regex(/^[A-Za-z0-9_-]{22}$/),
  port: z.number().int().min(1).max(65_535),
  controllerPort: z.number().int().min(1).max(65_535),
  heapMb: z.number().int().min(64),
  /** The process that guards the broker's lifetime (kills it when it exits); null for a daemon. */
  ownerPid: z.number().int().positive().nullable(),
});
export type BrokerMeta = z.infer<typeof metaSchema>;

export function readMeta(paths: BrokerPaths): BrokerMeta | undefined {
  if (!existsSync(paths.metaFile)) return undefined;
  let raw: unknown;
  try {
    raw = JSON.parse(readFileSync(paths.metaFile, 'utf8'));
  } catch (err) {
    throw new NearcastError('NEARCAST_STATE_CORRUPT', [`${paths.metaFile} is not JSON: ${(err as Error).message}`]);
  }
  const parsed = metaSchema.safeParse(raw);
  if (!parsed.success) {
    const why = parsed.error.issues.map((i) => `${i.path.join('.') || '(root)'}: ${i.message}`).join(', ');
    throw new NearcastError('NEARCAST_STATE_CORRUPT', [`${paths.metaFile}: ${why}; delete the folder ${paths.dir} to start afresh`]);
  }
  return parsed.data;
}

export function writeMeta(paths: BrokerPaths, meta: BrokerMeta): void {
  writeFileSync(paths.metaFile, `${JSON.stringify(meta, null, 2)}\n`);
}

export function readPidFile(paths: BrokerPaths): number | undefined {
  if (!existsSync(paths.pidFile)) return undefined;
  const pid = Number(readFileSync(paths.pidFile, 'utf8').trim());
  return Number.isInteger(pid) && pid > 0 ? pid : undefined;
}

export function writePidFile(paths: BrokerPaths, pid: number): void {
  writeFileSync(paths.pidFile, `${pid}\n`);
}

export function removePidFile(paths: BrokerPaths): void {
  rmSync(paths.pidFile, { force: true });
}

export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Whether pid is a live Kafka JVM started with this folder's server.properties. Guards against a pid file
 * whose number the OS has since given to another process (we would otherwise kill a stranger).
 */
export function isBrokerProcess(pid: number, paths: BrokerPaths): boolean {
  if (!processAlive(pid)) return false;
  const commandLine = readCommandLine(pid);
  return commandLine.includes('kafka.Kafka') && commandLine.includes(paths.serverProperties);
}

function readCommandLine(pid: number): string {
  const proc = `/proc/${pid}/cmdline`;
  try {
    if (existsSync('/proc/self/cmdline')) return readFileSync(proc, 'utf8').split('\0').join(' ');
    return execFileSync('ps', ['-ww', '-p', String(pid), '-o', 'args='], { encoding: 'utf8' });
  } catch {
    return ''; // exited (or a zombie) between the two calls
  }
}

export type PidState =
  | { readonly kind: 'running'; readonly pid: number }
  | { readonly kind: 'stale'; readonly pid: number }
  | { readonly kind: 'none' };

/** Reads the pid file and says whether it names our live broker, a dead one (stale file) or nothing. */
export function pidState(paths: BrokerPaths): PidState {
  const pid = readPidFile(paths);
  if (pid === undefined) return existsSync(paths.pidFile) ? { kind: 'stale', pid: 0 } : { kind: 'none' };
  return isBrokerProcess(pid, paths) ? { kind: 'running', pid } : { kind: 'stale', pid };
}
