// Dense linear algebra for least squares: Householder QR and triangular inverses. Internal to the
// regression modules; inputs are copied, never changed.

/** R (p×p, upper triangular, row-major rows) and Qᵀy of a Householder QR factorisation. */
export interface QrFactors {
  readonly r: readonly (readonly number[])[];
  readonly qty: Float64Array;
}

// A = QR by p Householder reflections H_k = I − 2vvᵀ/(vᵀv) (Golub & Van Loan, Matrix Computations, 4th ed., §5.2.2); Qᵀy by the same reflections.
export function householderQr(columns: readonly ArrayLike<number>[], y: ArrayLike<number>): QrFactors {
  const p = columns.length;
  const n = y.length;
  if (p === 0 || n < p) throw new RangeError(`householderQr: need n ≥ p ≥ 1, got n=${n}, p=${p}`);
  const a = columns.map((c) => {
    if (c.length !== n) throw new RangeError(`householderQr: column length ${c.length} differs from n=${n}`);
    return Float64Array.from(c);
  });
  const b = Float64Array.from(y);
  const r: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const v = new Float64Array(n);
  for (let k = 0; k < p; k++) {
    const ak = a[k];
    // column norm, scaled against overflow and underflow
    let amax = 0;
    for (let i = k; i < n; i++) amax = Math.max(amax, Math.abs(ak[i]));
    if (amax === 0) {
      r[k][k] = 0;
      for (let j = k + 1; j < p; j++) r[k][j] = a[j][k];
      continue;
    }
    let ss = 0;
    for (let i = k; i < n; i++) ss += (ak[i] / amax) ** 2;
    const norm = amax * Math.sqrt(ss);
    const alpha = ak[k] > 0 ? -norm : norm;
    for (let i = k; i < n; i++) v[i] = ak[i];
    v[k] -= alpha;
    let vv = 0;
    for (let i = k; i < n; i++) vv += v[i] * v[i];
    r[k][k] = alpha;
    if (vv === 0) continue;
    const reflect = (col: Float64Array): void => {
      let s = 0;
      for (let i = k; i < n; i++) s += v[i] * col[i];
      const f = (2 * s) / vv;
      for (let i = k; i < n; i++) col[i] -= f * v[i];
    };
    for (let j = k + 1; j < p; j++) {
      reflect(a[j]);
      r[k][j] = a[j][k];
    }
    reflect(b);
  }
  return { r, qty: b };
}

// X = R⁻¹ for upper-triangular R by back substitution (R X = I, column by column).
export function upperTriangularInverse(r: readonly (readonly number[])[]): number[][] {
  const p = r.length;
  const inv: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let col = 0; col < p; col++) {
    for (let i = col; i >= 0; i--) {
      let s = i === col ? 1 : 0;
      for (let j = i + 1; j <= col; j++) s -= r[i][j] * inv[j][col];
      if (r[i][i] === 0) throw new RangeError('upperTriangularInverse: R is singular');
      inv[i][col] = s / r[i][i];
    }
  }
  return inv;
}

// C = σ²·F·Fᵀ, a covariance matrix from its factor F (sum of squares, so the result stays symmetric and PSD).
export function covarianceFromFactor(f: readonly (readonly number[])[], sigma2: number): number[][] {
  const p = f.length;
  const c: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = 0; k < f[i].length; k++) s += f[i][k] * f[j][k];
      c[i][j] = sigma2 * s;
      c[j][i] = c[i][j];
    }
  }
  return c;
}

// C = A·B for small dense matrices.
export function matMul(a: readonly (readonly number[])[], b: readonly (readonly number[])[]): number[][] {
  const m = b[0]?.length ?? 0;
  return a.map((row) => {
    const out = new Array<number>(m).fill(0);
    for (let k = 0; k < row.length; k++) {
      const rk = row[k];
      if (rk === 0) continue;
      for (let j = 0; j < m; j++) out[j] += rk * b[k][j];
    }
    return out;
  });
}
