import type { Command } from 'commander';
import { parseTimestamp } from '../contracts/primitives.ts';
import { NearcastError } from '../errors.ts';
import { configFromEnvironment, inputLimits, parsePositiveInt, runCommand } from './cli-support.ts';

export function registerBacktestCommand(program: Command): void {
  program
    .command('backtest')
    .description('replay a history folder in event time and write the plans, alerts, rejected lines and accuracy a live run would have produced')
    .requiredOption('--input <dir>', 'folder with orders, shipments, baselines (.ndjson or .csv), optional day-closes, and locations.json')
    .requiredOption('--out <dir>', 'folder for plans.ndjson, manifests.ndjson, alerts.ndjson, rejected.ndjson, accuracy.json')
    .option('--until <timestamp>', 'end of the history (RFC 3339): deadlines up to then still close their days')
    .option('--batch <records>', 'event-log records per applied batch', '2000')
    .option('--quiet', 'no progress lines on stderr')
    .action((opts: { input: string; out: string; until?: string; batch: string; quiet?: boolean }) =>
      runCommand(async () => {
        const { runBacktest } = await import('../runtime/backtest/run-backtest.ts');
        const { createCoreModels } = await import('../runtime/core-location-model.ts');
        const config = configFromEnvironment();
        const untilMs = opts.until === undefined ? undefined : parseTimestamp(opts.until);
        if (opts.until !== undefined && untilMs === undefined) {
          throw new NearcastError('NEARCAST_CONFIG_INVALID', ['--until: must be an RFC 3339 timestamp with an offset, e.g. 2026-07-27T04:00:00Z']);
        }
        const summary = await runBacktest({
          input: opts.input,
          out: opts.out,
          models: createCoreModels(config),
          limits: inputLimits(config),
          settings: { demandBasis: config.demandBasis },
          batchSize: parsePositiveInt('batch', opts.batch),
          ...(untilMs !== undefined ? { untilMs } : {}),
          ...(opts.quiet ? {} : { progress: (line: string) => console.error(line) }),
        });
        console.log(
          `backtest: ${summary.closes} closes, ${summary.plans} plans, ${summary.alerts} alert changes, ${summary.rejected} rejected lines → ${opts.out}`,
        );
      }),
    );
}
