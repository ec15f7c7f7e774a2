import type { Topics } from '../../config/topics.ts';
import { toKafkaBinary } from '../../contracts/cloudevents.ts';
import type { DeadLetterRecord } from '../../runtime/dead-letter.ts';
import { deadLetterOutput, outputDataText } from '../../runtime/output-records.ts';
import type { OutputRecord } from '../../runtime/stage-output.ts';
import type { OutgoingMessage } from './kafka-port.ts';

// Stage outputs as Kafka messages: CloudEvents binary content mode (attributes in ce_* headers, the record as the
// value), keyed for compaction; the location partitioner places each on its location's partition.

export function outputMessage(output: OutputRecord, topics: Topics): OutgoingMessage {
  const { headers, value } = toKafkaBinary(output.event, outputDataText(output));
  return { topic: topics[output.topic], key: output.key, value, headers };
}

/** A dead letter written by a transport itself (the ingest stage, or an unreadable event-log record). */
export function deadLetterMessage(record: DeadLetterRecord, topics: Topics, eventSource: string): OutgoingMessage {
  return outputMessage(deadLetterOutput(eventSource, record), topics);
}
