import { describe, expect, it } from 'vitest';
import { logLine } from './logger';

describe('text log lines', () => {
  it('turns a pino entry into one line with its level, message, fields and error, control characters escaped', () => {
    const entry = { level: 40, time: 1, pid: 2, hostname: 'h', app: 'stemwise', service: 'report', file: 'plots\x1b[2J\n.csv', err: { message: 'gone\x07' }, msg: 'service not available' };
    expect(logLine(JSON.stringify(entry))).toBe('stemwise: warning: service not available (service=report, file=plots\\u001b[2J\\u000a.csv): gone\\u0007\n');
    expect(logLine(JSON.stringify({ level: 50, msg: 'reconcile failed', n: 3 }))).toBe('stemwise: error: reconcile failed (n=3)\n');
  });
});
