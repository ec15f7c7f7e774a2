import { spawn } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { NearcastError } from '../../src/errors.ts';
import { mavenProblem, preconditionError } from './preconditions.ts';

// The broker's classpath comes from Maven Central through the pom beside this file. Maven writes into a
// scratch folder that is renamed into place only when it succeeded, so an interrupted fetch never leaves a
// half-filled lib/ that later runs would take as complete.

export const KAFKA_LOCAL_DIR = path.dirname(fileURLToPath(import.meta.url));
export const POM_FILE = path.join(KAFKA_LOCAL_DIR, 'pom.xml');
export const LIB_DIR = path.join(KAFKA_LOCAL_DIR, 'lib');
const MARKER = '.fetched';

/** The Kafka version the pom pins (its <kafka.version> property). */
export function pinnedKafkaVersion(): string {
  const m = /<kafka\.version>([^<]+)<\/kafka\.version>/.exec(readFileSync(POM_FILE, 'utf8'));
  if (!m?.[1]) throw new NearcastError('NEARCAST_BROKER_PRECONDITION', [`${POM_FILE} has no <kafka.version> property`]);
  return m[1].trim();
}

/** True when lib/ holds a complete copy for the pinned version (a bumped pom makes it stale). */
export function brokerJarsPresent(libDir = LIB_DIR): boolean {
  const marker = path.join(libDir, MARKER);
  return existsSync(marker) && readFileSync(marker, 'utf8').trim() === pinnedKafkaVersion();
}

export interface FetchResult {
  readonly fetched: boolean;
  readonly kafkaVersion: string;
  readonly jarCount: number;
  readonly elapsedMs: number;
}

/** Copies the broker jars into lib/ with Maven unless a complete copy is already there. */
export async function ensureBrokerJars(): Promise<FetchResult> {
  const started = performance.now();
  const kafkaVersion = pinnedKafkaVersion();
  if (brokerJarsPresent()) {
    return { fetched: false, kafkaVersion, jarCount: countJars(LIB_DIR), elapsedMs: performance.now() - started };
  }
  const problem = mavenProblem();
  if (problem) throw preconditionError([`the broker jars are not in ${LIB_DIR} and cannot be fetched: ${problem}`]);

  const scratch = `${LIB_DIR}.partial-${process.pid}`;
  rmSync(scratch, { recursive: true, force: true });
  try {
    await runMaven(['-B', '-q', '-Dstyle.color=never', '-f', POM_FILE, 'dependency:copy-dependencies', `-Dkafka.lib.dir=${scratch}`]);
    if (countJars(scratch) === 0) throw new NearcastError('NEARCAST_BROKER_PRECONDITION', ['Maven finished but copied no jars']);
    writeFileSync(path.join(scratch, MARKER), `${kafkaVersion}\n`);
    rmSync(LIB_DIR, { recursive: true, force: true });
    try {
      renameSync(scratch, LIB_DIR);
    } catch (err) {
      if (!brokerJarsPresent()) throw err; // a concurrent fetch won the rename; its copy is just as good
    }
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
  return { fetched: true, kafkaVersion, jarCount: countJars(LIB_DIR), elapsedMs: performance.now() - started };
}

function countJars(dir: string): number {
  return existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith('.jar')).length : 0;
}

function runMaven(args: readonly string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    // Output is kept and shown only on failure: with -q a good run prints nothing but terminal resets.
    const child = spawn('mvn', args, { stdio: ['ignore', 'pipe', 'pipe'] });
    const output: Buffer[] = [];
    child.stdout.on('data', (chunk: Buffer) => output.push(chunk));
    child.stderr.on('data', (chunk: Buffer) => output.push(chunk));
    child.once('error', (err) => reject(preconditionError([`could not run Maven: ${err.message}`])));
    child.once('close', (code, signal) => {
      if (code === 0) return resolve();
      const how = signal ? `was stopped by ${signal}` : `exited with code ${code}`;
      const tail = Buffer.concat(output).toString('utf8').trim().split('\n').slice(-30).join('\n');
      reject(preconditionError([`fetching the broker jars failed: "mvn ${args.join(' ')}" ${how}:\n${tail}`]));
    });
  });
}
