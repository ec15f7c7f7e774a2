import type { Command } from 'commander';
import { configFromEnvironment, inputLimits, parsePositiveInt, runCommand } from './cli-support.ts';

// `nearcast serve`: Kafka mode when NEARCAST_KAFKA_BROKERS is set (src/transport/kafka/serve-kafka.ts), otherwise
// the embedded default on one SQLite file with its HTTP routes and the live deadline / feed-health clock.

export function registerServeCommand(program: Command): void {
  program
    .command('serve')
    .description('run nearcast: on Kafka when brokers are configured, else embedded on a local SQLite file with HTTP ingestion')
    .option('--db <file>', 'embedded database (default: NEARCAST_DB or nearcast.sqlite)')
    .option('--input <dir>', 'embedded: first replay this history folder (resumes where it stopped)')
    .option('--host <host>', 'embedded HTTP host (default: NEARCAST_HTTP_HOST or 127.0.0.1)')
    .option('--port <port>', 'embedded HTTP port (default: NEARCAST_HTTP_PORT or 8080)')
    .option('--tick <seconds>', 'embedded: how often the live clock writes due deadline closes and feed-health checks', '30')
    .action((opts: { db?: string; input?: string; host?: string; port?: string; tick: string }) =>
      runCommand(async () => {
        const { RecordValidator } = await import('../contracts/validate.ts');
        const { createLogger } = await import('../log.ts');
        const { createCoreModels } = await import('../runtime/core-location-model.ts');
        const { EmbeddedRuntime } = await import('../transport/embedded/embedded-runtime.ts');
        const { EmbeddedStore } = await import('../transport/embedded/embedded-store.ts');
        const { feedHistory } = await import('../transport/embedded/history-feed.ts');
        const { buildHttpApp } = await import('../transport/embedded/http-app.ts');
        const { LiveClock } = await import('../transport/embedded/live-clock.ts');
        const config = configFromEnvironment();
        const logger = createLogger(config.log.level);
        const models = createCoreModels(config);
        if (config.kafka.brokers) {
          // The Kafka engineer's entry point; it handles SIGTERM itself and stops gracefully.
          const { serveKafka } = await import('../transport/kafka/serve-kafka.ts');
          await serveKafka(config, logger, { models, stageSettings: { demandBasis: config.demandBasis } });
          return;
        }
        const database = opts.db ?? config.embedded.database;
        const store = new EmbeddedStore(database);
        const runtime = new EmbeddedRuntime({ store, models, settings: { demandBasis: config.demandBasis } });
        const validator = new RecordValidator(inputLimits(config));
        const clock = new LiveClock(runtime, () => Date.now());
        if (opts.input) {
          const fed = await feedHistory(runtime, opts.input, { validator, progress: (line) => logger.info(line) });
          logger.info({ ...fed, input: opts.input }, 'history replayed into the embedded log');
        }
        runtime.pump();
        const app = buildHttpApp({ runtime, validator, config, clock, now: () => Date.now() });
        const host = opts.host ?? config.http.host;
        const port = opts.port ? parsePositiveInt('port', opts.port) : config.http.port;
        await app.listen({ host, port });
        if (config.tokens.length === 0) logger.warn('no tokens configured: the embedded HTTP routes are open to anyone who can reach them');
        logger.info({ database, host, port }, 'nearcast serving (embedded)');
        const timer = setInterval(() => {
          try {
            clock.tick();
          } catch (error) {
            logger.error({ err: error }, 'live clock tick failed; it is retried on the next tick');
          }
        }, parsePositiveInt('tick', opts.tick) * 1000);
        await new Promise<void>((resolve) => {
          const stop = () => resolve();
          process.once('SIGTERM', stop);
          process.once('SIGINT', stop);
        });
        clearInterval(timer);
        await app.close();
        store.close();
        logger.info('nearcast stopped');
      }),
    );
}
