import type { Command } from 'commander';
import { registerBacktestCommand } from './backtest-command.ts';
import { registerDeadLetterCommand } from './dead-letter-command.ts';
import { registerDemoCommand } from './demo-command.ts';
import { registerSchemasCommand } from './schemas-command.ts';
import { registerServeCommand } from './serve-command.ts';
import { registerTopicsCommand } from './topics-command.ts';

// Each subcommand lives in its own module and registers itself here; the list is what `nearcast --help` shows.
export function registerCommands(program: Command): void {
  registerServeCommand(program);
  registerDemoCommand(program);
  registerBacktestCommand(program);
  registerSchemasCommand(program);
  registerTopicsCommand(program);
  registerDeadLetterCommand(program);
  program
    .command('broker')
    .description('run a local Apache Kafka broker (KRaft, from Maven Central jars) for tests and local use')
    .argument('<action>', 'fetch | start | stop | status | restart | kill')
    .option('--port <port>', 'client port on 127.0.0.1', '19092')
    .option('--dir <dir>', 'state folder (data, pid file, logs)', '.kafka-local')
    .action(async (action: string, opts: { port: string; dir: string }) => {
      const { runBrokerCommand } = await import('../../scripts/kafka-local/local-broker.ts');
      process.exitCode = await runBrokerCommand(action, { port: Number(opts.port), dir: opts.dir });
    });
}
