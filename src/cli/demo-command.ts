import type { Command } from 'commander';
import { configFromEnvironment, runCommand } from './cli-support.ts';

export function registerDemoCommand(program: Command): void {
  program
    .command('demo')
    .description('generate an invented beverage-distributor history, run it through the embedded runtime and print what nearcast made of it')
    .option('--keep <dir>', 'write the history folder and the SQLite file here (default: a temporary folder)')
    .option('--quiet', 'no progress lines on stderr')
    .action((opts: { keep?: string; quiet?: boolean }) =>
      runCommand(async () => {
        const { runDemo } = await import('../demo/run-demo.ts');
        const { createCoreModels } = await import('../runtime/core-location-model.ts');
        const config = configFromEnvironment();
        const result = await runDemo({
          models: createCoreModels(config),
          ...(opts.keep ? { keepDir: opts.keep } : {}),
          ...(opts.quiet ? {} : { progress: (line: string) => console.error(line) }),
        });
        console.log(result.text);
      }),
    );
}
