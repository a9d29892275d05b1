import { pino, type DestinationStream, type Logger } from 'pino';
import { terminalSafe } from './terminal-text';

export type { Logger };

/** `json`: one JSON object per line (services, log collectors). `text`: one line for a person (commands). */
export type LogFormat = 'json' | 'text';

const LEVEL_NAMES: Record<number, string> = { 10: 'trace', 20: 'debug', 30: 'info', 40: 'warning', 50: 'error', 60: 'fatal' };
const PLUMBING = new Set(['level', 'time', 'pid', 'hostname', 'app', 'msg', 'err']);

/** A pino entry as one human line: `stemwise: warning: message (key=value, …): error message`. */
export function logLine(json: string): string {
  const e = JSON.parse(json) as Record<string, unknown> & { level: number; msg?: string; err?: { message?: string } };
  const fields = Object.entries(e)
    .filter(([k]) => !PLUMBING.has(k))
    .map(([k, v]) => `${k}=${typeof v === 'string' ? v : JSON.stringify(v)}`);
  const text = `${e.msg ?? ''}${fields.length ? ` (${fields.join(', ')})` : ''}${e.err?.message ? `: ${e.err.message}` : ''}`;
  return `stemwise: ${LEVEL_NAMES[e.level] ?? e.level}: ${terminalSafe(text, { inline: true })}\n`;
}

/** Text lines written through process.stderr (so they interleave in order with a command's own lines). */
const textDestination: DestinationStream = { write: (json: string) => void process.stderr.write(logLine(json)) };

/** Logs on stderr (stdout stays free for command output such as exports): JSON lines, or text lines. */
export function createLogger(level: string, bindings: Record<string, unknown> = {}, format: LogFormat = 'json'): Logger {
  return pino({ level, base: { app: 'stemwise', ...bindings } }, format === 'text' ? textDestination : pino.destination(2));
}
