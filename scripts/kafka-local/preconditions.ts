import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { NearcastError } from '../../src/errors.ts';

// Checked before anything is written or spawned, so a machine without the tools gets one clear message
// that says what else would work, instead of a Java or Maven stack trace half-way through.

export const BROKER_ALTERNATIVES =
  'Ways to get a Kafka broker for nearcast: ' +
  '(1) set KAFKA_BROKERS=host:port to use an existing broker; ' +
  '(2) run on a machine with a Docker engine, where the tests start one through testcontainers; ' +
  '(3) install Java 17+ and Maven 3.6.3+, then run `nearcast broker fetch` and `nearcast broker start`.';

export const MIN_JAVA_MAJOR = 17;
const MIN_MAVEN: readonly [number, number, number] = [3, 6, 3]; // maven-dependency-plugin 3.8.1 requires it

export function preconditionError(reasons: readonly string[]): NearcastError {
  return new NearcastError('NEARCAST_BROKER_PRECONDITION', [...reasons, BROKER_ALTERNATIVES]);
}

/** The java launcher to use: $JAVA_HOME/bin/java when JAVA_HOME points at a JDK, else `java` on the PATH. */
export function javaCommand(): string {
  const home = process.env.JAVA_HOME;
  if (home) {
    const candidate = path.join(home, 'bin', 'java');
    if (existsSync(candidate)) return candidate;
  }
  return 'java';
}

/** Major version from `java -version` output: "17.0.15" → 17, legacy "1.8.0_392" → 8. */
export function parseJavaMajor(versionOutput: string): number | undefined {
  const m = /version "(\d+)(?:\.(\d+))?/.exec(versionOutput);
  if (!m) return undefined;
  const first = Number(m[1]);
  return first === 1 && m[2] !== undefined ? Number(m[2]) : first;
}

/** "Apache Maven 3.8.7 (...)" → [3, 8, 7]. */
export function parseMavenVersion(versionOutput: string): [number, number, number] | undefined {
  const m = /Apache Maven (\d+)\.(\d+)\.(\d+)/.exec(versionOutput);
  return m ? [Number(m[1]), Number(m[2]), Number(m[3])] : undefined;
}

/** Returns the reason Java is unusable, or undefined when Java 17+ answers. */
export function javaProblem(): string | undefined {
  const java = javaCommand();
  const run = spawnSync(java, ['-version'], { encoding: 'utf8', timeout: 30_000 });
  if (run.error) return `Java was not found (tried "${java}": ${run.error.message})`;
  const major = parseJavaMajor(`${run.stderr}\n${run.stdout}`);
  if (major === undefined) return `could not read the Java version from "${java} -version"`;
  if (major < MIN_JAVA_MAJOR) return `Java ${major} found at "${java}", but the broker needs Java ${MIN_JAVA_MAJOR} or newer`;
  return undefined;
}

/** Returns the reason Maven is unusable, or undefined when Maven 3.6.3+ answers. */
export function mavenProblem(): string | undefined {
  const run = spawnSync('mvn', ['-v'], { encoding: 'utf8', timeout: 60_000 });
  if (run.error) return `Maven was not found ("mvn": ${run.error.message})`;
  const version = parseMavenVersion(`${run.stdout}\n${run.stderr}`);
  if (!version) return 'could not read the Maven version from "mvn -v"';
  for (let i = 0; i < 3; i += 1) {
    const [have, need] = [version[i] ?? 0, MIN_MAVEN[i] ?? 0];
    if (have > need) break;
    if (have < need) return `Maven ${version.join('.')} found, but fetching the broker jars needs Maven ${MIN_MAVEN.join('.')} or newer`;
  }
  return undefined;
}

/** Resolves to an error message when nothing may listen on 127.0.0.1:port, else undefined. */
export function portProblem(port: number, role: string): Promise<string | undefined> {
  return new Promise((resolve) => {
    const server = net.createServer();
    server.once('error', (err: NodeJS.ErrnoException) => {
      resolve(`the ${role} port 127.0.0.1:${port} is not free (${err.code ?? err.message}); pick another with --port`);
    });
    server.listen({ port, host: '127.0.0.1', exclusive: true }, () => server.close(() => resolve(undefined)));
  });
}

/** A port the OS considers free right now on 127.0.0.1 (listen on 0, read it back, close). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen({ port: 0, host: '127.0.0.1', exclusive: true }, () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export function validPort(port: number): boolean {
  return Number.isInteger(port) && port >= 1 && port <= 65_535;
}
