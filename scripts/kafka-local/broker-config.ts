// The broker's two config files. Single node, KRaft, combined broker+controller, both listeners on 127.0.0.1
// (kafkajs cannot parse IPv6 literals and `localhost` may resolve to ::1 first).

export interface BrokerConfigInput {
  readonly port: number;
  readonly controllerPort: number;
  readonly dataDir: string;
}

export function serverProperties({ port, controllerPort, dataDir }: BrokerConfigInput): string {
  return [
    '# Written by nearcast (scripts/kafka-local/broker-config.ts); rewritten on every start.',
    'process.roles=broker,controller',
    'node.id=1',
    // Static voters let `StorageTool format` run without --standalone.
    `controller.quorum.voters=1@127.0.0.1:${controllerPort}`,
    `listeners=PLAINTEXT://127.0.0.1:${port},CONTROLLER://127.0.0.1:${controllerPort}`,
    // Must be reachable by the broker itself: the transaction coordinator sends its commit markers there.
    `advertised.listeners=PLAINTEXT://127.0.0.1:${port}`,
    'inter.broker.listener.name=PLAINTEXT',
    'controller.listener.names=CONTROLLER',
    'listener.security.protocol.map=CONTROLLER:PLAINTEXT,PLAINTEXT:PLAINTEXT',
    `log.dirs=${dataDir}`,
    'num.partitions=1',
    'default.replication.factor=1',
    // Internal topics default to replication 3; on one node they would never be created and groups and
    // transactions would wait forever for their coordinator.
    'offsets.topic.replication.factor=1',
    'offsets.topic.num.partitions=1',
    'transaction.state.log.replication.factor=1',
    'transaction.state.log.min.isr=1',
    'transaction.state.log.num.partitions=1',
    'min.insync.replicas=1',
    // A group's first member does not wait 3 s for others (tests start one consumer at a time).
    'group.initial.rebalance.delay.ms=0',
    // Tests create their topics explicitly; a typo must fail rather than create a topic.
    'auto.create.topics.enable=false',
    'delete.topic.enable=true',
    // The log cleaner looks for compactable segments every 15 s by default; tests of compacted topics want
    // it to notice their (small, quickly rolled) segments within a second.
    'log.cleaner.backoff.ms=500',
    // After a SIGKILL the restarted broker cannot register until the controller gives up on its previous
    // incarnation's session (DUPLICATE_BROKER_REGISTRATION, seen here: ~10 s with the 9 s default); a short
    // session makes kill-and-start-again tests wait ~4 s instead. 8 missed heartbeats still needed to fence.
    'broker.session.timeout.ms=4000',
    'broker.heartbeat.interval.ms=500',
    // Two cores: fewer threads than the defaults, which are sized for a production machine.
    'num.network.threads=2',
    'num.io.threads=2',
    'background.threads=2',
    'num.recovery.threads.per.data.dir=1',
    'log.cleaner.threads=1',
    '',
  ].join('\n');
}

const LOG_LEVELS = ['ERROR', 'WARN', 'INFO', 'DEBUG'] as const;

/**
 * reload4j (log4j 1.x syntax), console only: warnings, plus the line that says the server started.
 * NEARCAST_BROKER_LOG_LEVEL=INFO (or DEBUG) turns the broker's own logging up when diagnosing it.
 */
export function log4jProperties(level = process.env.NEARCAST_BROKER_LOG_LEVEL?.toUpperCase() ?? 'WARN'): string {
  const root = (LOG_LEVELS as readonly string[]).includes(level) ? level : 'WARN';
  return [
    `log4j.rootLogger=${root}, stdout`,
    'log4j.appender.stdout=org.apache.log4j.ConsoleAppender',
    'log4j.appender.stdout.layout=org.apache.log4j.PatternLayout',
    'log4j.appender.stdout.layout.ConversionPattern=[%d] %p %m (%c)%n',
    'log4j.logger.kafka.server.KafkaRaftServer=INFO',
    '',
  ].join('\n');
}
