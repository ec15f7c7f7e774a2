// What the integration global setup hands to the tests (vitest provide/inject; values must be serialisable).
export type KafkaBrokerSource = 'env' | 'testcontainers' | 'jar';

declare module 'vitest' {
  export interface ProvidedContext {
    /** Comma-separated bootstrap addresses, e.g. "127.0.0.1:40123". */
    kafkaBrokers: string;
    /** Where the broker came from: KAFKA_BROKERS, a testcontainers container, or the local jar broker. */
    kafkaBrokerSource: KafkaBrokerSource;
    /** State folder of the jar broker the setup started (restart/kill go through it); '' for other sources. */
    kafkaBrokerDir: string;
  }
}
