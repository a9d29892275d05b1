import type { NoteCode, SummaryNote } from '@stemwise/core';

export function note(code: NoteCode, message: string, forestType: string | null = null, variable: string | null = null): SummaryNote {
  return { code, message, forest_type: forestType, variable };
}

export const fmtHa = (ha: number): string => `${Number(ha.toPrecision(6))} ha`;
