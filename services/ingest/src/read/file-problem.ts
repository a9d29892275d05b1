import type { Rule } from '@stemwise/core';

/** A problem that stops the reading of a whole file (corrupt gzip, wrong encoding, a line over 1 MB…). */
export class FileProblem extends Error {
  constructor(
    readonly rule: Rule,
    readonly line: number | null,
    message: string,
  ) {
    super(message);
    this.name = 'FileProblem';
  }
}
