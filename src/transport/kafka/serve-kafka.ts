import type { Config } from '../../config/config.ts';
import { NearcastError } from '../../errors.ts';
import type { Logger } from '../../log.ts';
import type { LocationModelFactory } from '../../runtime/location-model-port.ts';
import { createSensingStage } from '../../runtime/sensing-stage.ts';
import type { SensingStage } from '../../runtime/sensing-stage-port.ts';
import { DEFAULT_STAGE_SETTINGS, type StageSettings } from '../../runtime/stage-settings.ts';
import { createCrashPoints, type CrashPoints } from './crash-points.ts';
import { IngestConsumer } from './ingest-consumer.ts';
import type { KafkaPort } from './kafka-port.ts';
import { createKafkajsPort } from './kafkajs-port.ts';
import { SensingConsumer } from './sensing-consumer.ts';
import { ensureTopics, topicSpecs } from './topic-setup.ts';

// `nearcast serve` in Kafka mode: topic set-up, then the ingest stage and the sensing stage in one process (each
// can also run alone and be scaled out: instances of one deployment share the group ids and transactional ids).

export type KafkaStageName = 'ingest' | 'sensing';

export interface ServeKafkaOptions {
  readonly stages?: readonly KafkaStageName[];
  /** The sensing engine per location; required unless createStage is given. */
  readonly models?: LocationModelFactory;
  readonly createStage?: (partition: number) => SensingStage;
  readonly stageSettings?: Partial<StageSettings>;
  /** Environment for the crash-point test hook (NEARCAST_CRASH_AT); default process.env. */
  readonly env?: Readonly<Record<string, string | undefined>>;
  /** Stop gracefully on SIGTERM and SIGINT (default true). */
  readonly handleSignals?: boolean;
  /** Create or correct the topics before starting (default true). */
  readonly setUpTopics?: boolean;
  readonly port?: KafkaPort;
  readonly onSensingCommitted?: (partition: number, nextOffset: string) => void;
  /**
   * The live clock of the sensing stage (DESIGN section 6): every event-log partition owner writes the deadline
   * closes and feed-health checks that fell due into the event log. Default: the wall clock, checked every 60 s.
   * `false` writes none (a service fed a recorded log whose times are not now, e.g. tests of other behaviour).
   */
  readonly clock?: false | { readonly now?: () => number; readonly intervalMs?: number };
}

export const DEFAULT_CLOCK_INTERVAL_MS = 60_000;

export interface KafkaService {
  readonly ingest?: IngestConsumer;
  readonly sensing?: SensingConsumer;
  /** Leaves the groups and closes every producer; idempotent. */
  stop(): Promise<void>;
  /** Settles when the service stopped: resolves after stop(), rejects when a consumer gave up. */
  readonly stopped: Promise<void>;
}

export function kafkaGroupIds(config: Pick<Config, 'kafka'>): { sensing: string; ingest: string } {
  return { sensing: config.kafka.groupId, ingest: `${config.kafka.groupId}-ingest` };
}

export function createPortFromConfig(config: Config, logger: Logger): KafkaPort {
  if (!config.kafka.brokers) throw new NearcastError('NEARCAST_CONFIG_INVALID', ['kafka.brokers (NEARCAST_KAFKA_BROKERS): is required for Kafka mode']);
  return createKafkajsPort({
    brokers: config.kafka.brokers.split(','),
    clientId: config.kafka.clientId,
    ssl: config.kafka.ssl,
    ...(config.kafka.sasl ? { sasl: config.kafka.sasl } : {}),
    logger,
  });
}

export async function serveKafka(config: Config, logger: Logger, options: ServeKafkaOptions = {}): Promise<KafkaService> {
  const stages = new Set(options.stages ?? ['ingest', 'sensing']);
  const port = options.port ?? createPortFromConfig(config, logger);
  const crash: CrashPoints = createCrashPoints((options.env ?? process.env).NEARCAST_CRASH_AT);
  const settings: StageSettings = { ...DEFAULT_STAGE_SETTINGS, demandBasis: config.demandBasis, ...options.stageSettings };
  const createStage =
    options.createStage ??
    (options.models ? (partition: number) => createSensingStage({ partition, models: options.models!, settings }) : undefined);
  if (stages.has('sensing') && !createStage) {
    throw new NearcastError('NEARCAST_CONFIG_INVALID', ['serveKafka: the sensing stage needs the location models (options.models)']);
  }
  const groups = kafkaGroupIds(config);
  const clockInterval = options.clock === false ? undefined : (options.clock?.intervalMs ?? DEFAULT_CLOCK_INTERVAL_MS);
  if (clockInterval !== undefined && !(Number.isInteger(clockInterval) && clockInterval > 0)) {
    throw new NearcastError('NEARCAST_CONFIG_INVALID', [`serveKafka: clock.intervalMs must be a positive whole number of milliseconds, not ${clockInterval}`]);
  }

  if (options.setUpTopics !== false) {
    const admin = await port.admin();
    try {
      const report = await ensureTopics(admin, topicSpecs(config), { events: config.topics.events, changelog: config.topics.changelog });
      for (const w of report.warnings) logger.warn(w);
      if (report.created.length > 0) logger.info({ topics: report.created }, 'topics created');
    } finally {
      await admin.close();
    }
  }

  const concurrency = Math.min(config.kafka.partitions, 8);
  const ingest = stages.has('ingest')
    ? new IngestConsumer({
        port,
        topics: config.topics,
        groupId: groups.ingest,
        transactionalIdPrefix: groups.ingest,
        limits: config.limits,
        sessionTimeoutMs: config.kafka.sessionTimeoutMs,
        maxMessageBytes: config.kafka.maxMessageBytes,
        partitionsConsumedConcurrently: concurrency,
        crash,
        logger,
        eventSource: '/nearcast/ingest',
      })
    : undefined;
  const sensing = stages.has('sensing')
    ? new SensingConsumer({
        port,
        topics: config.topics,
        groupId: groups.sensing,
        transactionalIdPrefix: groups.sensing,
        createStage: createStage!,
        sessionTimeoutMs: config.kafka.sessionTimeoutMs,
        maxMessageBytes: config.kafka.maxMessageBytes,
        partitionsConsumedConcurrently: concurrency,
        crash,
        logger,
        eventSource: settings.eventSource,
        ...(options.onSensingCommitted ? { onCommitted: options.onSensingCommitted } : {}),
        ...(options.clock === false
          ? {}
          : {
              clock: {
                now: options.clock?.now ?? Date.now,
                intervalMs: clockInterval!,
                settings: { feedStallAfterMs: settings.feedStallAfterMs, defaultDayCloseDeadline: settings.defaultDayCloseDeadline },
              },
            }),
      })
    : undefined;

  let settle: { resolve: () => void; reject: (e: Error) => void } | undefined;
  const stopped = new Promise<void>((resolve, reject) => (settle = { resolve, reject }));
  stopped.catch(() => undefined); // a caller that never awaits it must not see an unhandled rejection
  let stopping: Promise<void> | undefined;
  let failure: Error | undefined;
  const onSignal = (signal: string) => {
    logger.info({ signal }, 'stopping: leaving the consumer groups and closing producers');
    void stop();
  };
  const stop = (): Promise<void> => {
    stopping ??= (async () => {
      if (options.handleSignals !== false) {
        process.off('SIGTERM', onSignal);
        process.off('SIGINT', onSignal);
      }
      await Promise.all([ingest?.stop(), sensing?.stop()]);
      if (failure) settle?.reject(failure);
      else settle?.resolve();
    })();
    return stopping;
  };
  const crashed = (stage: KafkaStageName) => (error: Error) => {
    logger.fatal({ err: error, stage }, 'a Kafka consumer gave up');
    failure ??= new NearcastError('NEARCAST_KAFKA_UNAVAILABLE', [`the ${stage} consumer stopped: ${error.message}`], { cause: error });
    void stop();
  };
  if (options.handleSignals !== false) {
    process.once('SIGTERM', onSignal);
    process.once('SIGINT', onSignal);
  }
  await Promise.all([ingest?.start(crashed('ingest')), sensing?.start(crashed('sensing'))]);
  logger.info({ stages: [...stages], brokers: config.kafka.brokers }, 'nearcast serving on Kafka');
  return { ...(ingest ? { ingest } : {}), ...(sensing ? { sensing } : {}), stop, stopped };
}
