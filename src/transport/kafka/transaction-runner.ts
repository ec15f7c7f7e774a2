import { NearcastError } from '../../errors.ts';
import type { CrashPoints } from './crash-points.ts';
import { kafkaErrorType, type OutgoingMessage, type TransactionalProducer, type WrittenOffset } from './kafka-port.ts';
import { chunkMessages } from './message-chunks.ts';

// One short transaction: the consumed offsets, then messages in size-bounded chunks, then commit. Any failure
// aborts (best effort) and surfaces as NEARCAST_KAFKA_TRANSACTION_FAILED; the caller then drops what it applied,
// replaces the producer and restores (a kafkajs producer whose commit failed cannot be trusted to begin again).

export interface TransactionWork {
  readonly messages: readonly OutgoingMessage[];
  readonly offsets?: { readonly groupId: string; readonly offsets: readonly WrittenOffset[] };
}

export interface TransactionOptions {
  readonly maxMessageBytes: number;
  readonly crash: CrashPoints;
  /** Called between chunks so a long transaction keeps the consumer's group session alive. */
  readonly heartbeat?: () => Promise<void>;
  /** Attempts for requests refused with CONCURRENT_TRANSACTIONS (the previous commit's markers still being written). */
  readonly concurrentRetries?: number;
}

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/**
 * kafkajs retries CONCURRENT_TRANSACTIONS on AddPartitionsToTxn but not on AddOffsetsToTxn (tulios/kafkajs#430): a
 * transaction begun right after the previous commit then fails for a reason that clears within milliseconds.
 */
export async function retryConcurrentTransactions<T>(attempt: () => Promise<T>, retries = 200): Promise<T> {
  // A short fixed wait rather than a doubling one: the coordinator is busy only until the previous commit's markers
  // are written (hundreds of ms on a loaded broker), and a doubling wait overshoots that by up to as much again.
  for (let i = 0; ; i++) {
    try {
      return await attempt();
    } catch (err) {
      if (kafkaErrorType(err) !== 'CONCURRENT_TRANSACTIONS' || i >= retries) throw err;
      await sleep(CONCURRENT_RETRY_MS);
    }
  }
}

const CONCURRENT_RETRY_MS = 25;

export async function runTransaction(producer: TransactionalProducer, work: TransactionWork, options: TransactionOptions): Promise<WrittenOffset[]> {
  const retries = options.concurrentRetries ?? 200;
  let tx;
  try {
    tx = await producer.begin();
  } catch (err) {
    throw failed(producer, 'begin', err);
  }
  let stage = 'sendOffsets';
  try {
    // Offsets first: the first request of a transaction is the one that meets CONCURRENT_TRANSACTIONS while the
    // previous commit completes, and ours retries it every 25 ms, where kafkajs's own retry of a send starts at
    // 200 ms and doubles. The order inside a transaction changes nothing about what commits.
    if (work.offsets && work.offsets.offsets.length > 0) {
      const { groupId, offsets } = work.offsets;
      await retryConcurrentTransactions(() => tx.sendOffsets(groupId, offsets), retries);
    }
    options.crash.pass('after-offsets');
    stage = 'send';
    const written: WrittenOffset[] = [];
    for (const chunk of chunkMessages(work.messages, options.maxMessageBytes)) {
      written.push(...(await retryConcurrentTransactions(() => tx.send(chunk), retries)));
      await options.heartbeat?.();
    }
    options.crash.pass('after-produce');
    stage = 'commit';
    options.crash.passSoon('during-commit', 3);
    await tx.commit();
    return written;
  } catch (err) {
    if (err instanceof NearcastError && err.code === 'NEARCAST_KAFKA_MESSAGE_TOO_LARGE') {
      await tx.abort().catch(() => undefined);
      throw err;
    }
    if (stage !== 'commit') await tx.abort().catch(() => undefined);
    throw failed(producer, stage, err);
  }
}

function failed(producer: TransactionalProducer, stage: string, err: unknown): NearcastError {
  const type = kafkaErrorType(err);
  const why = `${stage} of ${producer.transactionalId} failed: ${type ?? (err as Error).message}`;
  return new NearcastError('NEARCAST_KAFKA_TRANSACTION_FAILED', [why], { cause: err });
}
