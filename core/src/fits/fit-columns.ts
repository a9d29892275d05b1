import { StemwiseError } from '@stemwise/platform';
import { FITTABLE_METRIC_COLUMNS } from '@stemwise/db/catalogue';

/** The numeric `export plots` columns a fit may use as its metric or axis (the catalogue's fittable ones). */
export const FITTABLE_COLUMNS: readonly string[] = FITTABLE_METRIC_COLUMNS;

/** Checks a metric or axis name; a bad one is a usage error listing the valid names. */
export function checkFitColumn(kind: 'axis' | 'metric', name: string): string {
  if (!FITTABLE_COLUMNS.includes(name)) {
    throw new StemwiseError('usage', `unknown ${kind} '${name}'; choose one of: ${FITTABLE_COLUMNS.join(', ')}`);
  }
  return name;
}
