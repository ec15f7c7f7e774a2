import type { Command } from 'commander';
import { configFromEnvironment, inputLimits, runCommand } from './cli-support.ts';

export function registerDeadLetterCommand(program: Command): void {
  const dl = program.command('dead-letter').description('list or replay quarantined records (embedded mode)');
  dl.command('list')
    .description('list dead letters with their reasons')
    .option('--db <file>', 'embedded database (default: NEARCAST_DB or nearcast.sqlite)')
    .option('--location <id>', 'only this location')
    .option('--code <code>', 'only this error code, e.g. NEARCAST_INPUT_UNKNOWN_LOCATION')
    .action((opts: { db?: string; location?: string; code?: string }) =>
      runCommand(async () => {
        const { EmbeddedStore } = await import('../transport/embedded/embedded-store.ts');
        const config = configFromEnvironment();
        const store = new EmbeddedStore(opts.db ?? config.embedded.database);
        try {
          const rows = store.deadLetters({ ...(opts.location ? { location: opts.location } : {}), ...(opts.code ? { code: opts.code } : {}) });
          for (const r of rows) console.log(`${r.key}\t${r.record.code}\t${r.record.reason}`);
          console.error(`${rows.length} dead letters`);
        } finally {
          store.close();
        }
      }),
    );
  dl.command('replay')
    .description('feed dead letters through ingest again (e.g. once the master data names their location); those accepted leave the list')
    .option('--db <file>', 'embedded database (default: NEARCAST_DB or nearcast.sqlite)')
    .option('--location <id>', 'only this location')
    .option('--code <code>', 'only this error code (default: every retriable one)')
    .action((opts: { db?: string; location?: string; code?: string }) =>
      runCommand(async () => {
        const { RecordValidator } = await import('../contracts/validate.ts');
        const { createCoreModels } = await import('../runtime/core-location-model.ts');
        const { EmbeddedRuntime } = await import('../transport/embedded/embedded-runtime.ts');
        const { EmbeddedStore } = await import('../transport/embedded/embedded-store.ts');
        const { replayDeadLetters } = await import('../transport/embedded/dead-letter-replay.ts');
        const config = configFromEnvironment();
        const store = new EmbeddedStore(opts.db ?? config.embedded.database);
        try {
          const runtime = new EmbeddedRuntime({ store, models: createCoreModels(config), settings: { demandBasis: config.demandBasis } });
          const report = replayDeadLetters(runtime, new RecordValidator(inputLimits(config)), {
            ...(opts.location ? { location: opts.location } : {}),
            ...(opts.code ? { code: opts.code } : {}),
            arrivalMs: Date.now(),
          });
          console.log(`replayed ${report.replayed}: ${report.accepted} accepted into the event log, ${report.stillRefused} refused again, ${report.stillDead} back in quarantine after sensing`);
        } finally {
          store.close();
        }
      }),
    );
}
