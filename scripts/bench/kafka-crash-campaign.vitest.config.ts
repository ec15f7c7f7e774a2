import { defineConfig } from 'vitest/config';

// Opt-in: the long Kafka crash campaign, with the integration suite's broker set-up.
export default defineConfig({
  test: {
    include: ['scripts/bench/kafka-crash-campaign.test.ts'],
    globalSetup: ['test/integration/kafka.global-setup.ts'],
    testTimeout: 180_000,
    hookTimeout: 180_000,
    fileParallelism: false,
  },
});
