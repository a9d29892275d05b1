import { StemwiseError } from '@stemwise/platform';
import { PLOT_METRIC_COLUMNS } from '../science/plot-metrics';

/** The numeric `export plots` columns a fit may use as its metric or axis. */
export const FITTABLE_COLUMNS: readonly string[] = PLOT_METRIC_COLUMNS.map((c) => c.column);

/** Checks a metric or axis name; a bad one is a usage error listing the valid names. */
export function checkFitColumn(kind: 'axis' | 'metric', name: string): string {
  if (!FITTABLE_COLUMNS.includes(name)) {
    throw new StemwiseError('usage', `unknown ${kind} '${name}'; choose one of: ${FITTABLE_COLUMNS.join(', ')}`);
  }
  return name;
}
