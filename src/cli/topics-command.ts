import type { Command } from 'commander';
import { loadConfig } from '../config/config.ts';
import { createLogger } from '../log.ts';
import { createPortFromConfig } from '../transport/kafka/serve-kafka.ts';
import { ensureTopics, TOPIC_POLICY, topicSpecs } from '../transport/kafka/topic-setup.ts';

// `nearcast topics`: create every nearcast topic (or put drifted settings back), or with --dry-run list what the
// set-up would ask for. Idempotent, so a deployment script may run it on every release.

export function registerTopicsCommand(program: Command): void {
  program
    .command('topics')
    .description('create the Kafka topics (partitions, cleanup policies, compaction settings); safe to run again')
    .option('--dry-run', 'print the topic specifications without contacting a broker')
    .action(async (opts: { dryRun?: boolean }) => {
      const config = loadConfig({ env: process.env });
      const specs = topicSpecs(config);
      if (opts.dryRun) {
        for (const [role, spec] of Object.keys(TOPIC_POLICY).map((r, i) => [r, specs[i]!] as const)) {
          const why = TOPIC_POLICY[role as keyof typeof TOPIC_POLICY].why;
          console.log(`${spec.topic}  partitions=${spec.partitions} rf=${spec.replicationFactor} ${Object.entries(spec.config).map(([k, v]) => `${k}=${v}`).join(' ')}  (${why})`);
        }
        return;
      }
      const port = createPortFromConfig(config, createLogger(config.log.level === 'info' ? 'warn' : config.log.level));
      const admin = await port.admin();
      try {
        const report = await ensureTopics(admin, specs, { events: config.topics.events, changelog: config.topics.changelog });
        for (const t of report.created) console.log(`created   ${t}`);
        for (const [t, keys] of Object.entries(report.updated)) console.log(`corrected ${t}: ${keys.join(', ')}`);
        for (const t of report.unchanged) console.log(`unchanged ${t}`);
        for (const w of report.warnings) console.error(`warning: ${w}`);
      } finally {
        await admin.close();
      }
    });
}
