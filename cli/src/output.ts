import { terminalSafe } from '@stemwise/platform';

// Every line a command shows goes through these two: text from uploads or the database (file names,
// region names, labels, issue messages) may hold terminal control characters, which are shown escaped.
// Only the progress bars (numbers and our own cursor movements) and exports written to stdout (data in
// a documented format, byte for byte) are written directly.

/** Writes to stdout, control characters escaped. */
export function printOut(text: string): void {
  process.stdout.write(terminalSafe(text));
}

/** Writes to stderr, control characters escaped. */
export function printErr(text: string): void {
  process.stderr.write(terminalSafe(text));
}

/** One value inside a line or a tab-separated row: its newlines and tabs are escaped as well. */
export const field = (value: string): string => terminalSafe(value, { inline: true });
