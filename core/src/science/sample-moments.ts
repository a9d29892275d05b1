import { EstimatorInputError } from './estimator-errors';

function assertFinite(fn: string, values: readonly number[]): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      throw new EstimatorInputError(fn, 'NON_FINITE_VALUE', `value at index ${i} is ${String(values[i])}, not a finite number`);
    }
  }
}

// ȳ = Σ yᵢ / n, the sample mean (Cochran 1977, Sampling Techniques 3rd ed., ch. 2)
export function sampleMean(values: readonly number[]): number {
  if (values.length === 0) throw new EstimatorInputError('sampleMean', 'EMPTY_SAMPLE', 'needs at least one value');
  assertFinite('sampleMean', values);
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

// s² = Σ (yᵢ − ȳ)² / (n − 1), two-pass with a correction term (Cochran 1977 ch. 2; Chan, Golub & LeVeque 1983, Am. Stat. 37:242)
export function sampleVariance(values: readonly number[]): number {
  if (values.length < 2) {
    throw new EstimatorInputError('sampleVariance', 'EMPTY_SAMPLE', `needs at least two values, got ${values.length}`);
  }
  assertFinite('sampleVariance', values);
  const mean = sampleMean(values);
  let squares = 0;
  let residual = 0;
  for (const v of values) {
    const d = v - mean;
    squares += d * d;
    residual += d;
  }
  // The residual sum is 0 in exact arithmetic; subtracting its square/n removes the rounding of the mean.
  return (squares - (residual * residual) / values.length) / (values.length - 1);
}
