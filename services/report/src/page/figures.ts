// Numbers for people (the exports keep full precision; the page rounds).

const grouped = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });

/** 3 significant figures below 1000, whole numbers with digit grouping above; '–' when missing. */
export function figure(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  const a = Math.abs(x);
  if (a >= 1000) return grouped.format(x);
  if (a === 0) return '0';
  return String(Number(x.toPrecision(3)));
}

/** A share (0–1) as a percentage with one decimal. */
export function percentOfShare(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  return `${(100 * x).toFixed(1)} %`;
}

/** A sampling error (already in percent) as ±x.x %. */
export function samplingError(pct: number | null | undefined): string {
  if (pct === null || pct === undefined || !Number.isFinite(pct)) return '–';
  return `±${pct.toFixed(1)} %`;
}

// Rounding to the precision a standard error supports (docs/methods.md#rounding-on-the-pages): the SE to
// two significant digits, the estimate and its interval to the same decimal place — common practice,
// as the GUM advises (JCGM 100:2008, §7.2.6; memory). Pages only: the exports keep full precision.

/** Power of ten of the SE's second significant digit (after rounding the SE to two digits); null without a positive finite SE. */
export function sePlace(se: number | null | undefined): number | null {
  if (se === null || se === undefined || !Number.isFinite(se) || se === 0) return null;
  // toExponential rounds first, so 9.96 → 1.0e+1 (place 0), not 9.96 → place −1
  const exponent = Number(Math.abs(se).toExponential(1).split('e')[1]);
  return exponent - 1;
}

const MAX_FRACTION_DIGITS = 20;

/** x rounded to the decimal place 10^place, for people: digit grouping, trailing zeros kept to that place. */
export function atPlace(x: number, place: number): string {
  const decimals = Math.max(0, -place);
  if (decimals > MAX_FRACTION_DIGITS) {
    const digits = Math.max(0, Number(x.toExponential().split('e')[1]) - place);
    return x.toExponential(Math.min(digits, 100));
  }
  const scale = 10 ** Math.max(0, place);
  let r = decimals > 0 ? Number(x.toFixed(decimals)) : Math.sign(x) * Math.round(Math.abs(x) / scale) * scale;
  if (r === 0) r = 0; // no "-0"
  return new Intl.NumberFormat('en-GB', { minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(r);
}

/** An estimate rounded to the precision its SE supports; without a usable SE (missing or 0), as figure(). */
export function estimate(x: number | null | undefined, se: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  const place = sePlace(se);
  return place === null ? figure(x) : atPlace(x, place);
}

/** The SE itself to two significant digits ('0' when it is 0). */
export function standardError(se: number | null | undefined): string {
  if (se === 0) return '0';
  return estimate(se, se);
}

/** An interval with both ends rounded to the precision of the estimate's SE. */
export function estimateInterval(low: number | null | undefined, high: number | null | undefined, se: number | null | undefined): string {
  if (low === null || low === undefined || high === null || high === undefined) return '–';
  return `${estimate(low, se)} – ${estimate(high, se)}`;
}

/** A share (0–1) and its SE as a percentage rounded to the precision of the SE ('–' when missing). */
export function sharePercent(x: number | null | undefined, se: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  if (se === null || se === undefined || se === 0) return percentOfShare(x);
  return `${estimate(100 * x, 100 * se)} %`;
}

export function interval(low: number | null | undefined, high: number | null | undefined): string {
  if (low === null || low === undefined || high === null || high === undefined) return '–';
  return `${figure(low)} – ${figure(high)}`;
}

export function isoDate(d: Date): string {
  return d.toISOString().slice(0, 10);
}

export function isoMinute(d: Date): string {
  return `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}
