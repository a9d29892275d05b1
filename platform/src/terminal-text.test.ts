import { describe, expect, it } from 'vitest';
import { terminalSafe } from './terminal-text';

describe('terminalSafe', () => {
  it('escapes ESC sequences, bell, carriage return, DEL and C1 controls (ECMA-48 / ISO 6429 control sets)', () => {
    expect(terminalSafe('plots\x1b[2J\x07.csv')).toBe('plots\\u001b[2J\\u0007.csv');
    expect(terminalSafe('a\rb\x7f\x9b31m')).toBe('a\\u000db\\u007f\\u009b31m');
    expect(terminalSafe('\x1b]0;title\x07')).not.toMatch(/[\x00-\x08\x0b-\x1f\x7f-\x9f]/);
  });

  it('escapes the bidirectional controls of Unicode Standard Annex #9', () => {
    expect(terminalSafe('exe.\u202Etxt')).toBe('exe.\\u202etxt');
    expect(terminalSafe('\u2066x\u2069\u200E\u061C')).toBe('\\u2066x\\u2069\\u200e\\u061c');
  });

  it('keeps newlines, tabs and ordinary text (accents, other scripts) unless inline', () => {
    const text = 'Région Hautes-Terres\tÎle\n  Quill aurea — 3 stems, 木';
    expect(terminalSafe(text)).toBe(text);
    expect(terminalSafe('a\tb\nc', { inline: true })).toBe('a\\u0009b\\u000ac');
  });

  it('keeps JSON valid, with the same values once parsed', () => {
    const value = { name: 'x\x1b[2J\x07\x9b\u202E' };
    const safe = terminalSafe(JSON.stringify(value, null, 2));
    expect(safe).not.toMatch(/[\x1b\x07\x9b\u202E]/);
    expect(JSON.parse(safe)).toEqual(value);
  });
});
