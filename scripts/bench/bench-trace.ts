// A timeline of one Kafka bench phase: what the port was asked to do and when (group joins, producer inits,
// transactions and their parts, fetched batches and their sizes), to explain where wall time goes before and
// between committed batches. Off unless BENCH_TRACE is set; BENCH_TRACE=<file> writes every event to that file.
import { writeFileSync } from 'node:fs';
import type { GroupConsumer, KafkaPort, TransactionalProducer } from '../../src/transport/kafka/kafka-port.ts';

interface TraceEvent {
  readonly ms: number;
  readonly who: string;
  readonly what: string;
  readonly durMs?: number;
}

export class BenchTrace {
  private events: TraceEvent[] = [];
  private t0 = performance.now();
  /** The phase on the monotonic clock in µs, the clock of a --cpu-prof profile's sample times. */
  private window = { start: 0n, end: 0n };

  constructor(readonly enabled: boolean) {}

  reset(): void {
    this.events = [];
    this.t0 = performance.now();
    this.window = { start: process.hrtime.bigint() / 1000n, end: 0n };
  }

  end(): void {
    this.window.end = process.hrtime.bigint() / 1000n;
  }

  mark(who: string, what: string, since?: number): void {
    if (!this.enabled) return;
    const now = performance.now();
    this.events.push({ ms: now - this.t0, who, what, ...(since === undefined ? {} : { durMs: now - since }) });
  }

  async timed<T>(who: string, what: string, run: () => Promise<T>): Promise<T> {
    const started = performance.now();
    try {
      return await run();
    } finally {
      this.mark(who, what, started);
    }
  }

  /** The port with every call that waits on the broker recorded. */
  wrap(port: KafkaPort): KafkaPort {
    if (!this.enabled) return port;
    return {
      ...port,
      admin: () => this.timed('admin', 'connect', () => port.admin()),
      transactionalProducer: (id) => this.producer(port.transactionalProducer(id)),
      consumer: (options) => this.consumer(options.groupId, port.consumer(options)),
    };
  }

  private producer(producer: TransactionalProducer): TransactionalProducer {
    const who = producer.transactionalId.replace(/^bench-[0-9a-f]+/, '').replace(/bench-[0-9a-f]+\.nearcast\./, '');
    return {
      transactionalId: producer.transactionalId,
      init: () => this.timed(who, 'init', () => producer.init()),
      close: () => producer.close(),
      begin: async () => {
        const tx = await this.timed(who, 'begin', () => producer.begin());
        return {
          send: (m) => this.timed(who, `send ${m.length}`, () => tx.send(m)),
          sendOffsets: (g, o) => this.timed(who, 'sendOffsets', () => tx.sendOffsets(g, o)),
          commit: () => this.timed(who, 'commit', () => tx.commit()),
          abort: () => this.timed(who, 'abort', () => tx.abort()),
        };
      },
    };
  }

  private consumer(groupId: string, consumer: GroupConsumer): GroupConsumer {
    const who = `group ${groupId.replace(/^bench-[0-9a-f]+/, '') || '(sensing)'}`;
    return {
      ...consumer,
      run: (handlers) =>
        this.timed(who, 'run() resolved', () => {
          this.mark(who, 'run() called');
          return consumer.run({
            ...handlers,
            onAssignment: (a) => {
              this.mark(who, `joined: ${a.length} partitions`);
              handlers.onAssignment(a);
            },
            eachBatch: (batch, ctx) => {
              const bytes = batch.messages.reduce((n, m) => n + (m.value?.length ?? 0), 0);
              return this.timed(who, `batch ${batch.topic.replace(/^bench-[0-9a-f]+\.nearcast\./, '')}[${batch.partition}] ${batch.messages.length} msgs ${Math.round(bytes / 1024)} KiB`, () => handlers.eachBatch(batch, ctx));
            },
          });
        }),
    };
  }

  /** The events to stdout (the first `limit`) and, when BENCH_TRACE names a file, all of them there. */
  print(limit = 200): void {
    if (!this.enabled) return;
    const lines = this.events
      .sort((a, b) => a.ms - (a.durMs ?? 0) - (b.ms - (b.durMs ?? 0)) || a.ms - b.ms)
      .map((e) => {
        const start = e.durMs === undefined ? e.ms : e.ms - e.durMs;
        return `${start.toFixed(0).padStart(7)} ms ${e.durMs === undefined ? '       ' : `+${e.durMs.toFixed(0).padStart(5)} ms`}  ${e.who.padEnd(40)} ${e.what}`;
      });
    const file = process.env.BENCH_TRACE;
    if (file && file !== '1') writeFileSync(file, lines.join('\n') + '\n');
    console.log(`timeline (${lines.length} events${lines.length > limit ? `, first ${limit}` : ''}; phase on the --cpu-prof clock: ${this.window.start}–${this.window.end} µs):`);
    for (const l of lines.slice(0, limit)) console.log(`  ${l}`);
  }
}
