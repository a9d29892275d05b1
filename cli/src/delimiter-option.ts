import { checkDelimiter, SubmissionError } from '@stemwise/core';
import { StemwiseError } from '@stemwise/platform';

/** The --delimiter option through the one delimiter check of an upload; a bad value is a usage error. */
export function delimiterOption(value: string | undefined): ',' | ';' | undefined {
  try {
    return checkDelimiter(value);
  } catch (err) {
    if (err instanceof SubmissionError) throw new StemwiseError('usage', `--delimiter: ${err.message}`);
    throw err;
  }
}
