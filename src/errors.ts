// One registry of every error nearcast reports. Codes are stable (consumers, dashboards and dead-letter readers
// key on them); messages are written for a planner, not for a programmer.

export interface ErrorSpec {
  readonly message: string;
  readonly httpStatus: number;
  /** Whether trying the same thing again later may succeed (a broker hiccup) or never will (a bad record). */
  readonly retriable: boolean;
}

export const ERRORS = {
  NEARCAST_INPUT_INVALID: { message: 'The record does not match its contract', httpStatus: 400, retriable: false },
  NEARCAST_INPUT_MALFORMED_JSON: { message: 'The record is not valid JSON', httpStatus: 400, retriable: false },
  NEARCAST_INPUT_TOO_DEEP: { message: 'The record nests objects or arrays deeper than allowed', httpStatus: 400, retriable: false },
  NEARCAST_INPUT_TOO_LARGE: { message: 'The record is larger than allowed', httpStatus: 413, retriable: false },
  NEARCAST_INPUT_UNKNOWN_LOCATION: { message: 'The record names a location that the master data does not know', httpStatus: 422, retriable: true },
  NEARCAST_INPUT_TOO_LATE: { message: 'The revision is older than the lookback plus the horizon and can no longer change any plan', httpStatus: 422, retriable: false },
  NEARCAST_INPUT_WEEK_MISALIGNED: { message: "A baseline week does not start on the location's week start", httpStatus: 422, retriable: false },
  NEARCAST_INPUT_WRONG_LOCATION: { message: 'The record belongs to another location than the state it was applied to', httpStatus: 422, retriable: false },
  NEARCAST_INPUT_UNKNOWN_TYPE: { message: 'The record type is not one nearcast reads', httpStatus: 400, retriable: false },
  NEARCAST_CONFIG_INVALID: { message: 'The configuration has settings that are not valid', httpStatus: 500, retriable: false },
  NEARCAST_CALENDAR_INVALID: { message: 'A calendar setting or date is not valid', httpStatus: 400, retriable: false },
  NEARCAST_STATS_ARGUMENT_INVALID: { message: 'A statistics function was given an argument outside its domain', httpStatus: 500, retriable: false },
  NEARCAST_SOLVER_SINGULAR: { message: 'The regression has too few independent rows to fit', httpStatus: 500, retriable: false },
  NEARCAST_STATE_CORRUPT: { message: 'Saved state could not be read back', httpStatus: 500, retriable: false },
  NEARCAST_KAFKA_UNAVAILABLE: { message: 'The Kafka broker could not be reached', httpStatus: 503, retriable: true },
  NEARCAST_KAFKA_TRANSACTION_FAILED: { message: 'A Kafka transaction failed and was rolled back', httpStatus: 503, retriable: true },
  NEARCAST_KAFKA_MESSAGE_TOO_LARGE: { message: 'A record is larger than the configured Kafka message size limit', httpStatus: 500, retriable: false },
  NEARCAST_BROKER_PRECONDITION: { message: 'A local Kafka broker cannot be started on this machine', httpStatus: 500, retriable: false },
  NEARCAST_WEBHOOK_REFUSED: { message: 'The webhook target is not allowed', httpStatus: 500, retriable: false },
  NEARCAST_WEBHOOK_DELIVERY_FAILED: { message: 'The webhook receiver did not accept the alert', httpStatus: 502, retriable: true },
  NEARCAST_API_NOT_FOUND: { message: 'Nothing was found at this address', httpStatus: 404, retriable: false },
  NEARCAST_API_UNAUTHORIZED: { message: 'A valid token is required', httpStatus: 401, retriable: false },
  NEARCAST_API_FORBIDDEN: { message: 'The token does not allow this', httpStatus: 403, retriable: false },
  NEARCAST_ALERT_TRANSITION_INVALID: { message: 'The alert cannot make this change from its current state', httpStatus: 409, retriable: false },
  NEARCAST_ALERT_NOT_FOUND: { message: 'No alert with this id is known at this location', httpStatus: 404, retriable: false },
  NEARCAST_ALERT_SNOOZE_INVALID: { message: 'The snooze date is not allowed', httpStatus: 400, retriable: false },
  NEARCAST_MONITORING_INPUT_INVALID: { message: 'The day given to monitoring is not valid', httpStatus: 400, retriable: false },
  NEARCAST_BACKTEST_INPUT_MISSING: { message: 'A required history file is missing', httpStatus: 400, retriable: false },
} as const satisfies Record<string, ErrorSpec>;

export type ErrorCode = keyof typeof ERRORS;

export class NearcastError extends Error {
  readonly code: ErrorCode;
  readonly retriable: boolean;
  readonly httpStatus: number;
  readonly details: readonly string[];

  constructor(code: ErrorCode, details: readonly string[] = [], options?: { cause?: unknown }) {
    const spec = ERRORS[code];
    super(details.length > 0 ? `${spec.message}: ${details.join('; ')}` : spec.message, options);
    this.name = 'NearcastError';
    this.code = code;
    this.retriable = spec.retriable;
    this.httpStatus = spec.httpStatus;
    this.details = details;
  }
}

export function isNearcastError(value: unknown, code?: ErrorCode): value is NearcastError {
  return value instanceof NearcastError && (code === undefined || value.code === code);
}
