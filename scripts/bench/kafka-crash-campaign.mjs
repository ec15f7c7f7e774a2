#!/usr/bin/env node
// Runs the long Kafka crash campaign (scripts/bench/kafka-crash-campaign.test.ts) against the integration broker.
import { spawnSync } from 'node:child_process';

const run = spawnSync('npx', ['vitest', 'run', '--config', 'scripts/bench/kafka-crash-campaign.vitest.config.ts'], { stdio: 'inherit' });
process.exit(run.status ?? 1);
