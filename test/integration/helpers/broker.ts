import { inject } from 'vitest';
import { killLocalBroker, localBrokerStatus, restartLocalBroker } from '../../../scripts/kafka-local/local-broker.ts';
import './provided-context.ts';

// Fault tests restart or kill the broker. Only the local jar broker started by the global setup can be
// driven: these go through its state folder and pid file, so a test worker can act on a broker that the
// vitest main process owns (which still stops it at teardown, and kills it if the run dies).

/** Why the broker cannot be restarted or killed from a test, or undefined when it can. */
export function brokerControlUnavailable(): string | undefined {
  if (inject('kafkaBrokerDir') !== '') return undefined;
  return `the broker comes from ${inject('kafkaBrokerSource') === 'env' ? 'KAFKA_BROKERS' : 'testcontainers'}; restart and kill need the local jar broker the setup starts`;
}

export const canControlBroker = (): boolean => brokerControlUnavailable() === undefined;

function stateDir(): string {
  const reason = brokerControlUnavailable();
  if (reason) throw new Error(reason);
  return inject('kafkaBrokerDir');
}

/** Graceful stop, then start again on the same data and port; resolves once it is warmed up again. */
export async function restartBroker(): Promise<void> {
  await restartLocalBroker(stateDir());
}

/** SIGKILL, as a crash would; the broker stays down until startAgain(). */
export async function killBroker(): Promise<void> {
  const outcome = await killLocalBroker(stateDir());
  if (outcome !== 'killed') throw new Error('killBroker: no broker was running');
}

/** Starts the broker again after killBroker() (or a stop) on the same data and port. */
export async function startAgain(): Promise<void> {
  const dir = stateDir();
  if (localBrokerStatus(dir).running) throw new Error('startAgain: the broker is still running; killBroker() first, or restartBroker()');
  await restartLocalBroker(dir);
}

/** The broker JVM's pid now, or undefined while it is down. */
export function brokerPid(): number | undefined {
  return localBrokerStatus(stateDir()).pid;
}
