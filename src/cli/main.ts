import { Command } from 'commander';
import { registerCommands } from './commands.ts';

const program = new Command();
program
  .name('nearcast')
  .description('Near-term demand sensing for demand planners, distribution centres and replenishment systems.')
  .showHelpAfterError();
registerCommands(program);
await program.parseAsync(process.argv);
