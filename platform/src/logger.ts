import { pino, type Logger } from 'pino';

export type { Logger };

/** Structured JSON logs on stderr (stdout stays free for command output such as exports). */
export function createLogger(level: string, bindings: Record<string, unknown> = {}): Logger {
  return pino({ level, base: { app: 'stemwise', ...bindings } }, pino.destination(2));
}
