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
