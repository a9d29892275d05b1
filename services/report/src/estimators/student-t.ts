import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { EstimatorInputError } from './errors';

// t = F⁻¹_ν((1 + c)/2), two-sided Student t multiplier at confidence c and ν degrees of freedom (Student 1908, Biometrika 6:1–25)
export function tMultiplier(confidence: number, df: number): number {
  if (!(confidence > 0 && confidence < 1)) {
    throw new EstimatorInputError('tMultiplier', 'BAD_OPTION', `confidence must lie strictly between 0 and 1, got ${String(confidence)}`);
  }
  if (!(df > 0) || !Number.isFinite(df)) {
    throw new EstimatorInputError('tMultiplier', 'BAD_OPTION', `degrees of freedom must be a finite positive number, got ${String(df)}`);
  }
  return tQuantile((1 + confidence) / 2, df);
}
