import { pino, type Logger, type LevelWithSilent } from 'pino';

// Fields that may carry secrets wherever they appear in a log line.
export const REDACT_PATHS = [
  'password',
  '*.password',
  '*.*.password',
  'secret',
  '*.secret',
  'token',
  '*.token',
  'authorization',
  'headers.authorization',
  'req.headers.authorization',
  'req.headers.cookie',
  'sasl',
  '*.sasl',
];

export function createLogger(level: LevelWithSilent = 'info', destination?: NodeJS.WritableStream): Logger {
  const options = { level, redact: { paths: REDACT_PATHS, censor: '[redacted]' }, base: { service: 'nearcast' } };
  return destination ? pino(options, destination as pino.DestinationStream) : pino(options);
}

export type { Logger };
