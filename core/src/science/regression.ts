// Ordinary least squares for a design of any width, solved stably: the predictors are centred and
// scaled, the design [1, z₁ … z_m] is factorised by Householder QR, and every result is mapped back
// to the ORIGINAL scale of the predictors. The normal equations are never formed.
// Formulas, sources and check values: docs/methods.md#least-squares-by-qr, docs/methods.md#aicc, docs/methods.md#hc3-robust-standard-errors.
import { covarianceFromFactor, householderQr, matMul, upperTriangularInverse } from './regression-qr';
import { studentTTwoSidedP } from './student-t';

export type RegressionErrorCode = 'bad_input' | 'too_few_points' | 'rank_deficient' | 'perfect_fit' | 'zero_variance';

/** A precondition of a fit failed; `code` is stable, the message names the function. */
export class RegressionError extends Error {
  constructor(
    readonly code: RegressionErrorCode,
    message: string,
  ) {
    super(message);
    this.name = 'RegressionError';
  }
}

/** Heteroskedasticity-consistent (HC3) covariance and the tests built on it. */
export interface RobustCovariance {
  readonly covariance: readonly (readonly number[])[];
  readonly standardErrors: readonly number[];
  readonly tValues: readonly number[];
  /** Two-sided, Student t with the residual degrees of freedom. */
  readonly pValues: readonly number[];
}

/** What is needed to predict stably: the centring, the scaling and R⁻¹ of the scaled design. */
export interface StableBasis {
  readonly center: readonly number[];
  readonly scale: readonly number[];
  readonly scaledCoefficients: readonly number[];
  readonly rInverse: readonly (readonly number[])[];
}

export interface OlsFit {
  readonly n: number;
  /** Number of coefficients, intercept included. */
  readonly p: number;
  /** Residual degrees of freedom n − p. */
  readonly df: number;
  /** [intercept, one per predictor], on the original scale. */
  readonly coefficients: readonly number[];
  /** σ̂²(XᵀX)⁻¹ on the original scale. */
  readonly covariance: readonly (readonly number[])[];
  readonly standardErrors: readonly number[];
  readonly tValues: readonly number[];
  /** Two-sided, Student t with df = n − p. */
  readonly pValues: readonly number[];
  /** Residual sum of squares. */
  readonly rss: number;
  /** √(RSS/(n − p)). */
  readonly residualSd: number;
  readonly r2: number;
  readonly adjR2: number;
  /** Maximised Gaussian log-likelihood (σ² at its ML value RSS/n). */
  readonly logLik: number;
  /** Parameters counted by AIC and AICc: the p coefficients plus the residual variance. */
  readonly k: number;
  readonly aic: number;
  /** null when n − k − 1 ≤ 0. */
  readonly aicc: number | null;
  readonly hc3?: RobustCovariance;
  readonly basis: StableBasis;
}

export interface OlsOptions {
  /** Also compute HC3 robust standard errors (MacKinnon & White 1985). Default false. */
  readonly hc3?: boolean;
}

/** RSS below this share of the total sum of squares counts as zero: rounding level (about n·ε² for an exact fit). */
export const EXACT_FIT_RSS_SHARE = 1e-24;
/**
 * An HC3 variance below this share of the classical variance of the same coefficient counts as zero:
 * with real scatter the two are of the same order; a coefficient fitted only by points with zero
 * residuals leaves rounding noise (about 1e-18 of it). stemwise's choice, far from both.
 */
export const ROBUST_ZERO_SHARE = 1e-12;

// Throws a RegressionError naming the function and the first non-finite value.
function checkFinite(fn: string, name: string, values: ArrayLike<number>): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) throw new RegressionError('bad_input', `${fn}: ${name}[${i}] is not a finite number (${values[i]})`);
  }
}

// ℓ = −n/2·(ln 2π + ln(RSS/n) + 1); AIC = −2ℓ + 2k; AICc = AIC + 2k(k+1)/(n − k − 1) (Hurvich & Tsai 1989, Biometrika 76:297–307), k = coefficients + 1 for σ².
export function informationCriteria(n: number, rss: number, coefficients: number): { logLik: number; k: number; aic: number; aicc: number | null } {
  if (!(rss > 0) || !(n > 0)) throw new RegressionError('bad_input', `informationCriteria: need n > 0 and RSS > 0, got n=${n}, RSS=${rss}`);
  const k = coefficients + 1;
  const logLik = (-n / 2) * (Math.log(2 * Math.PI) + Math.log(rss / n) + 1);
  const aic = -2 * logLik + 2 * k;
  const aicc = n - k - 1 > 0 ? aic + (2 * k * (k + 1)) / (n - k - 1) : null;
  return { logLik, k, aic, aicc };
}

// SEᵢ = √Cᵢᵢ, tᵢ = bᵢ/SEᵢ, two-sided pᵢ from Student t with the residual df; a zero (or rounded below
// zero) variance leaves t undefined, so it is refused with a stable code rather than divided by.
function testsFrom(fn: string, coefficients: readonly number[], covariance: readonly (readonly number[])[], df: number) {
  const standardErrors = covariance.map((row, i) => Math.sqrt(row[i]));
  const zero = standardErrors.findIndex((se) => !(se > 0 && Number.isFinite(se)));
  if (zero >= 0) throw new RegressionError('zero_variance', `${fn}: coefficient ${zero} has no sampling variance (its residuals have no scatter), so it cannot be tested`);
  const tValues = coefficients.map((b, i) => b / standardErrors[i]);
  const pValues = tValues.map((t) => studentTTwoSidedP(t, df));
  return { standardErrors, tValues, pValues };
}

// β̂ = argmin‖y − Xβ‖² with X = [1, x₁ … x_m]: QR of the centred, scaled design, β mapped back; Cov = σ̂²(XᵀX)⁻¹, σ̂² = RSS/(n − p) (any regression text, e.g. Seber & Lee 2003, Linear Regression Analysis, ch. 3 and 11).
export function fitOls(y: readonly number[], predictors: readonly (readonly number[])[], options: OlsOptions = {}): OlsFit {
  const fn = 'fitOls';
  const n = y.length;
  const m = predictors.length;
  const p = m + 1;
  checkFinite(fn, 'y', y);
  predictors.forEach((col, j) => {
    if (col.length !== n) throw new RegressionError('bad_input', `${fn}: predictor ${j} has ${col.length} values, y has ${n}`);
    checkFinite(fn, `predictor ${j}`, col);
  });
  if (n <= p) throw new RegressionError('too_few_points', `${fn}: ${n} observations cannot estimate ${p} coefficients with a residual variance (need n > p)`);

  // centre and scale each predictor (population SD); a constant column is collinear with the intercept
  const center: number[] = [];
  const scale: number[] = [];
  const z: Float64Array[] = [];
  predictors.forEach((col, j) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += col[i];
    const c = s / n;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (col[i] - c) ** 2;
    const sd = Math.sqrt(ss / n);
    if (!(sd > 1e-13 * Math.max(Math.abs(c), Number.MIN_VALUE))) {
      throw new RegressionError('rank_deficient', `${fn}: predictor ${j} is constant, so it cannot be told apart from the intercept`);
    }
    const zj = new Float64Array(n);
    for (let i = 0; i < n; i++) zj[i] = (col[i] - c) / sd;
    center.push(c);
    scale.push(sd);
    z.push(zj);
  });

  const ones = new Float64Array(n).fill(1);
  const { r, qty } = householderQr([ones, ...z], y);
  const maxDiag = Math.max(...r.map((row, i) => Math.abs(row[i])));
  r.forEach((row, i) => {
    if (!(Math.abs(row[i]) > 1e-10 * maxDiag)) {
      const which = i === 0 ? 'the intercept' : `predictor ${i - 1}`;
      throw new RegressionError('rank_deficient', `${fn}: the design is rank deficient: ${which} is a linear combination of the columns before it`);
    }
  });
  const rInverse = upperTriangularInverse(r);
  const scaledCoefficients = rInverse.map((row) => row.reduce((s, v, k) => s + v * qty[k], 0));

  // residuals from the scaled design (not from the tail of Qᵀy) so that HC3 can use them too
  const residuals = new Float64Array(n);
  let rss = 0;
  let ySum = 0;
  for (let i = 0; i < n; i++) {
    let fitted = scaledCoefficients[0];
    for (let j = 0; j < m; j++) fitted += scaledCoefficients[j + 1] * z[j][i];
    residuals[i] = y[i] - fitted;
    rss += residuals[i] * residuals[i];
    ySum += y[i];
  }
  const yMean = ySum / n;
  let tss = 0;
  for (let i = 0; i < n; i++) tss += (y[i] - yMean) ** 2;
  // Residuals at rounding level (RSS/TSS near the square of the machine epsilon) are an exact fit too.
  if (!(rss > EXACT_FIT_RSS_SHARE * tss)) throw new RegressionError('perfect_fit', `${fn}: the fit is exact (all residuals zero), so standard errors are undefined`);

  // β = T·β_s with T = [[1, −c/s], [0, diag(1/s)]]; Cov = σ²·(T R⁻¹)(T R⁻¹)ᵀ
  const t: number[][] = Array.from({ length: p }, (_, i) => {
    const row = new Array<number>(p).fill(0);
    if (i === 0) {
      row[0] = 1;
      for (let j = 0; j < m; j++) row[j + 1] = -center[j] / scale[j];
    } else row[i] = 1 / scale[i - 1];
    return row;
  });
  const coefficients = t.map((row) => row.reduce((s, v, k) => s + v * scaledCoefficients[k], 0));
  const df = n - p;
  const sigma2 = rss / df;
  const factor = matMul(t, rInverse);
  const covariance = covarianceFromFactor(factor, sigma2);
  const { standardErrors, tValues, pValues } = testsFrom(fn, coefficients, covariance, df);
  const r2 = 1 - rss / tss;
  const adjR2 = 1 - ((1 - r2) * (n - 1)) / df;
  const ic = informationCriteria(n, rss, p);

  let hc3: RobustCovariance | undefined;
  if (options.hc3) {
    // HC3 = (XᵀX)⁻¹ Σ xᵢxᵢᵀ eᵢ²/(1 − hᵢ)² (XᵀX)⁻¹ (MacKinnon & White 1985; Long & Ervin 2000), with
    // uᵢ = R⁻ᵀzᵢ so that hᵢ = ‖uᵢ‖² and (XᵀX)⁻¹xᵢ maps to R⁻¹uᵢ.
    const meat: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    const zi = new Float64Array(p);
    const u = new Float64Array(p);
    for (let i = 0; i < n; i++) {
      zi[0] = 1;
      for (let j = 0; j < m; j++) zi[j + 1] = z[j][i];
      let h = 0;
      for (let k = 0; k < p; k++) {
        let s = 0;
        for (let j = 0; j <= k; j++) s += rInverse[j][k] * zi[j];
        u[k] = s;
        h += s * s;
      }
      const lev = 1 - h;
      // a point with leverage 1 is fitted exactly; its residual carries no information
      if (!(lev > 1e-12)) continue;
      const w = (residuals[i] * residuals[i]) / (lev * lev);
      for (let a = 0; a < p; a++) for (let b = a; b < p; b++) meat[a][b] += w * u[a] * u[b];
    }
    for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) meat[a][b] = meat[b][a];
    const left = matMul(factor, meat);
    const robust = left.map((row) => factor.map((fRow) => row.reduce((s, v, k) => s + v * fRow[k], 0)));
    // A coefficient fitted only by points with zero residuals (a line through two repeated x values,
    // say) has a robust variance of zero up to rounding: not testable, rather than a huge t.
    robust.forEach((row, i) => {
      if (!(row[i] > ROBUST_ZERO_SHARE * covariance[i][i])) row[i] = 0;
    });
    hc3 = { covariance: robust, ...testsFrom(`${fn} (HC3)`, coefficients, robust, df) };
  }

  return {
    n,
    p,
    df,
    coefficients,
    covariance,
    standardErrors,
    tValues,
    pValues,
    rss,
    residualSd: Math.sqrt(sigma2),
    r2,
    adjR2,
    ...ic,
    ...(hc3 ? { hc3 } : {}),
    basis: { center, scale, scaledCoefficients, rInverse },
  };
}

// ŷ(x₀) = x₀ᵀβ̂ with SE = σ̂·‖R⁻ᵀz₀‖ (the standard error of the fitted mean, z₀ the scaled x₀).
export function predictOls(fit: OlsFit, predictors: readonly number[]): { mean: number; se: number } {
  const { center, scale, scaledCoefficients, rInverse } = fit.basis;
  if (predictors.length !== center.length) {
    throw new RegressionError('bad_input', `predictOls: expected ${center.length} predictor values, got ${predictors.length}`);
  }
  const z = [1, ...predictors.map((v, j) => (v - center[j]) / scale[j])];
  let mean = 0;
  let ss = 0;
  for (let k = 0; k < z.length; k++) {
    mean += scaledCoefficients[k] * z[k];
    let s = 0;
    for (let j = 0; j <= k; j++) s += rInverse[j][k] * z[j];
    ss += s * s;
  }
  return { mean, se: fit.residualSd * Math.sqrt(ss) };
}

export type PolynomialDegree = 1 | 2 | 3;

export interface PolynomialFit extends OlsFit {
  readonly degree: PolynomialDegree;
  /** The fit is computed in powers of (x − shift), shift = mean of x; coefficients are in powers of x. */
  readonly shift: number;
  /** Coefficients of 1, (x − shift), (x − shift)², … */
  readonly shiftedCoefficients: readonly number[];
  readonly shiftedCovariance: readonly (readonly number[])[];
}

// C(n, k) by the multiplicative formula (exact for the small n here).
function binomial(n: number, k: number): number {
  let c = 1;
  for (let i = 1; i <= k; i++) c = (c * (n - i + 1)) / i;
  return c;
}

// y = Σ_d b_d x^d, fitted as Σ_d a_d (x − x̄)^d and mapped back by b_k = Σ_{d≥k} C(d,k)(−x̄)^{d−k} a_d (binomial expansion).
export function fitPolynomial(x: readonly number[], y: readonly number[], degree: PolynomialDegree): PolynomialFit {
  const fn = 'fitPolynomial';
  if (![1, 2, 3].includes(degree)) throw new RegressionError('bad_input', `${fn}: degree must be 1, 2 or 3, got ${degree}`);
  if (x.length !== y.length) throw new RegressionError('bad_input', `${fn}: x has ${x.length} values, y has ${y.length}`);
  checkFinite(fn, 'x', x);
  if (x.length === 0) throw new RegressionError('too_few_points', `${fn}: no observations`);
  const shift = x.reduce((s, v) => s + v, 0) / x.length;
  const columns = polynomialColumns(x, degree, shift);
  const inner = fitOls(y, columns);
  const p = degree + 1;
  const t: number[][] = Array.from({ length: p }, (_, k) =>
    Array.from({ length: p }, (_, d) => (d >= k ? binomial(d, k) * (-shift) ** (d - k) : 0)),
  );
  const coefficients = t.map((row) => row.reduce((s, v, d) => s + v * inner.coefficients[d], 0));
  // Cov_b = T·Cov_a·Tᵀ, built from the factor so that it stays positive semi-definite
  const innerFactor = matMul(
    Array.from({ length: p }, (_, i) => {
      const row = new Array<number>(p).fill(0);
      if (i === 0) {
        row[0] = 1;
        for (let j = 0; j < degree; j++) row[j + 1] = -inner.basis.center[j] / inner.basis.scale[j];
      } else row[i] = 1 / inner.basis.scale[i - 1];
      return row;
    }),
    inner.basis.rInverse,
  );
  const covariance = covarianceFromFactor(matMul(t, innerFactor), inner.residualSd ** 2);
  const { standardErrors, tValues, pValues } = testsFrom(fn, coefficients, covariance, inner.df);
  return {
    ...inner,
    coefficients,
    covariance,
    standardErrors,
    tValues,
    pValues,
    degree,
    shift,
    shiftedCoefficients: inner.coefficients,
    shiftedCovariance: inner.covariance,
  };
}

// Columns (x − shift)^d for d = 1 … degree.
export function polynomialColumns(x: readonly number[], degree: PolynomialDegree, shift = 0): number[][] {
  return Array.from({ length: degree }, (_, d) => x.map((v) => (v - shift) ** (d + 1)));
}

// ŷ(x₀) and the SE of the fitted mean of a polynomial fit, evaluated in its stable basis.
export function predictPolynomial(fit: PolynomialFit, x: number): { mean: number; se: number } {
  return predictOls(fit, polynomialColumns([x], fit.degree, fit.shift).map((c) => c[0]));
}
