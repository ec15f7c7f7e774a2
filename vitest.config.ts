import { defineConfig } from 'vitest/config';

// Two projects: the pure unit suite, and the integration suite that needs a real Kafka broker
// (found or started once by the global setup, see test/integration/kafka.global-setup.ts).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['test/unit/**/*.test.ts'],
          testTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'integration',
          include: ['test/integration/**/*.test.ts'],
          globalSetup: ['test/integration/kafka.global-setup.ts'],
          testTimeout: 180_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
