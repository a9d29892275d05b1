// Local height–diameter model, fitted per forest type on stems whose height was measured, used to
// give a height to the stems that were not measured.
//   ln H = a + b ln D + c (ln D)²    — the log-quadratic form of Chave et al. 2014 (Global Change
//   Biology 20:3177–3190) eq. 6a, whose pantropical values are a = 0.893 − E, b = 0.760, c = −0.0340.
// Fitted by ordinary least squares on the log scale (Householder QR on centred and scaled ln D), and
// back-transformed with Baskerville's (1972) correction exp(RSE²/2) for the bias of the log model.
// Formulas, sources and check values: docs/methods.md#height-diameter-model, docs/methods.md#baskerville-correction.

import { householderQr } from './regression-qr';

/** A fitted height–diameter model with its fit statistics (log scale). */
export interface HeightDiameterModel {
  readonly a: number;
  readonly b: number;
  readonly c: number;
  /** Number of stems the model was fitted on. */
  readonly n: number;
  /** Residual standard error on the ln H scale, sqrt(SSE / (n − 3)). */
  readonly rse: number;
  /** Coefficient of determination on the ln H scale; null when all heights are equal. */
  readonly r2: number | null;
  /** Range of dbh (cm) the model was fitted on; predictions outside it are extrapolations. */
  readonly dbhMinCm: number;
  readonly dbhMaxCm: number;
  /** exp(RSE²/2), the back-transformation factor (Baskerville 1972). */
  readonly biasCorrection: number;
}

/**
 * Fewest measured heights for fitting a local model: 30, a common-practice threshold (no published
 * source); below it callers use the Chave et al. 2005 models without height.
 */
export const DEFAULT_MIN_HEIGHTS = 30;

/** Largest height a prediction may take, in m: the maximum the inventory format accepts. */
export const MAX_PREDICTED_HEIGHT_M = 100;

// n ≥ minHeights (common practice, default 30): whether a local H–D model may be fitted at all
export function hasEnoughHeights(nMeasured: number, minHeights: number = DEFAULT_MIN_HEIGHTS): boolean {
  if (!Number.isInteger(minHeights) || minHeights < 4) {
    throw new RangeError(`hasEnoughHeights: minHeights must be an integer >= 4 (got ${minHeights})`);
  }
  return nMeasured >= minHeights;
}

export interface HeightDiameterFitOptions {
  /** Fewest stems to fit on (default DEFAULT_MIN_HEIGHTS = 30, common practice; at least 4). */
  readonly minHeights?: number;
}

// ln H = a + b ln D + c (ln D)², OLS — Chave et al. 2014 eq. 6a form; bias factor exp(RSE²/2), Baskerville 1972
export function fitHeightDiameter(
  dbhCm: readonly number[],
  heightM: readonly number[],
  options: HeightDiameterFitOptions = {},
): HeightDiameterModel {
  const minHeights = options.minHeights ?? DEFAULT_MIN_HEIGHTS;
  const n = dbhCm.length;
  if (heightM.length !== n) {
    throw new RangeError(`fitHeightDiameter: dbh and height arrays differ in length (${n} vs ${heightM.length})`);
  }
  if (!hasEnoughHeights(n, minHeights)) {
    throw new RangeError(
      `fitHeightDiameter: ${n} measured heights, fewer than minHeights = ${minHeights}; ` +
        'use the Chave et al. 2005 models without height instead',
    );
  }
  const lnD = new Float64Array(n);
  const lnH = new Float64Array(n);
  let dMin = Number.POSITIVE_INFINITY;
  let dMax = 0;
  let mean = 0;
  for (let i = 0; i < n; i += 1) {
    const d = dbhCm[i];
    const h = heightM[i];
    if (!(d > 0) || !Number.isFinite(d) || !(h > 0) || !Number.isFinite(h)) {
      throw new RangeError(`fitHeightDiameter: dbh and height must be finite and > 0 (got ${d} cm, ${h} m at index ${i})`);
    }
    lnD[i] = Math.log(d);
    lnH[i] = Math.log(h);
    if (d < dMin) dMin = d;
    if (d > dMax) dMax = d;
    mean += lnD[i];
  }
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i += 1) ss += (lnD[i] - mean) ** 2;
  const scale = Math.sqrt(ss / n);
  if (dMin === dMax || !(scale > 0)) throw new RangeError('fitHeightDiameter: all diameters are equal; the model cannot be fitted');

  // Regress on t = (ln D − m)/s so that the columns 1, t, t² are well conditioned.
  const one = new Float64Array(n).fill(1);
  const t = new Float64Array(n);
  const t2 = new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    t[i] = (lnD[i] - mean) / scale;
    t2[i] = t[i] * t[i];
  }
  const { r, qty } = householderQr([one, t, t2], lnH);
  const colNorms = [Math.sqrt(n), Math.sqrt(n), Math.sqrt(t2.reduce((s, v) => s + v * v, 0))];
  for (let k = 0; k < 3; k += 1) {
    if (!(Math.abs(r[k][k]) > 1e-10 * colNorms[k])) {
      throw new RangeError('fitHeightDiameter: fewer than 3 distinct diameters; the model cannot be fitted');
    }
  }
  const g2 = qty[2] / r[2][2];
  const g1 = (qty[1] - r[1][2] * g2) / r[1][1];
  const g0 = (qty[0] - r[0][1] * g1 - r[0][2] * g2) / r[0][0];

  let sse = 0;
  let meanY = 0;
  for (let i = 0; i < n; i += 1) meanY += lnH[i];
  meanY /= n;
  let sst = 0;
  for (let i = 0; i < n; i += 1) {
    const e = lnH[i] - (g0 + g1 * t[i] + g2 * t2[i]);
    sse += e * e;
    sst += (lnH[i] - meanY) ** 2;
  }
  const rse = Math.sqrt(sse / (n - 3));
  // Back to ln D: g0 + g1 (L − m)/s + g2 (L − m)²/s²
  const c = g2 / (scale * scale);
  const b = g1 / scale - 2 * c * mean;
  const a = g0 - (g1 / scale) * mean + c * mean * mean;
  return {
    a,
    b,
    c,
    n,
    rse,
    r2: sst > 0 ? 1 - sse / sst : null,
    dbhMinCm: dMin,
    dbhMaxCm: dMax,
    biasCorrection: Math.exp((rse * rse) / 2),
  };
}

// H = min(100, exp(a + b ln D + c (ln D)²) · exp(RSE²/2)) m — Chave et al. 2014 eq. 6a form, Baskerville 1972
// Outside [dbhMinCm, dbhMaxCm] this extrapolates; callers report the range, nothing is clamped but H.
export function predictHeight(model: HeightDiameterModel, dbhCm: number): number {
  if (!(dbhCm > 0) || !Number.isFinite(dbhCm)) {
    throw new RangeError(`predictHeight: dbh must be a finite number > 0 cm (got ${dbhCm})`);
  }
  const l = Math.log(dbhCm);
  const h = Math.exp(model.a + model.b * l + model.c * l * l) * model.biasCorrection;
  return h < MAX_PREDICTED_HEIGHT_M ? h : MAX_PREDICTED_HEIGHT_M;
}

// max over D of |(H₁(D) / H₀(D))^0.976 − 1|, D over both models' fitted ranges: the largest relative change of a
// stem's AGB = 0.0673 (ρ D² H)^0.976 (Chave et al. 2014 eq. 4) when its modelled height moves from model 0 to
// model 1, and so a bound on the relative change of a plot's biomass (a weighted mean of its stems' ratios).
// ln(H₁/H₀) = Δa + Δb ln D + Δc (ln D)² + ln(bias₁/bias₀) is a quadratic in ln D: its extremes are at the ends
// of the range or at its vertex. The 100 m cap only draws the two heights closer; it is left out (an upper bound).
export function heightModelBiomassShift(from: HeightDiameterModel, to: HeightDiameterModel): number {
  const lo = Math.log(Math.min(from.dbhMinCm, to.dbhMinCm));
  const hi = Math.log(Math.max(from.dbhMaxCm, to.dbhMaxCm));
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || lo > hi) {
    throw new RangeError(`heightModelBiomassShift: the models' diameter ranges must be finite and above 0 cm`);
  }
  const da = to.a - from.a + Math.log(to.biasCorrection / from.biasCorrection);
  const db = to.b - from.b;
  const dc = to.c - from.c;
  const g = (l: number) => da + db * l + dc * l * l;
  const at = [lo, hi];
  if (dc !== 0) {
    const vertex = -db / (2 * dc);
    if (vertex > lo && vertex < hi) at.push(vertex);
  }
  const logs = at.map(g);
  const up = Math.exp(0.976 * Math.max(...logs)) - 1;
  const down = 1 - Math.exp(0.976 * Math.min(...logs));
  return Math.max(up, down, 0);
}
