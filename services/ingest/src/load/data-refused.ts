import { PermanentError } from '@stemwise/platform';

// PostgreSQL's error classes 22 (data exception: 22P05 untranslatable character, 22021 invalid byte
// sequence, 22003 numeric value out of range, 22P02 invalid text representation …) and 23 (integrity
// constraint violation) are caused by the data, not by the moment: a retry meets the same row again.

/** Is this a PostgreSQL error of class 22 or 23 (the data is at fault; no retry can mend it)? */
export function isDataError(err: unknown): boolean {
  const code = (err as { code?: unknown })?.code;
  return typeof code === 'string' && /^2[23][0-9A-Z]{3}$/.test(code);
}

/**
 * The permanent error a batch fails with when the database refuses one of its values: the file being
 * loaded and, for stems, their position in the load (COPY names the n-th row it received).
 */
export function dataRefused(err: unknown, file: string): PermanentError {
  const e = err as { message?: string; code?: string; where?: string };
  const copyRow = /COPY stems, line (\d+)/.exec(e.where ?? '')?.[1];
  const at = copyRow ? `, the ${ordinal(Number(copyRow))} stem sent to the database` : '';
  const detail = (e.message ?? String(err)).split('\n')[0];
  return new PermanentError(
    'ingest_data_refused',
    `${file}${at}: the database refused a value (${e.code}: ${detail}); nothing of the batch was loaded — correct the file and upload it again`,
    { cause: err },
  );
}

function ordinal(n: number): string {
  const tens = n % 100;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : ['th', 'st', 'nd', 'rd'][n % 10] ?? 'th';
  return `${n.toLocaleString('en-US')}${suffix}`;
}
