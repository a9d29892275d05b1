// The planted diversity–disturbance signal, recovered from the written files the way the pipeline
// will see them: index and Fisher's alpha per plot computed here by simple test-local code (the
// pipeline's own implementations live in services/compute and are not used, so this is a check
// from outside the generator).

import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateInventory, type GenerateResult } from './generate';
import { PLANTED_CURVES } from './planted-curves';
import { generatePlot } from './plot-generator';
import { buildFlora } from './species';

type Row = Record<string, string>;
// The generator never quotes a field (generate.test.ts reads the same files with a full CSV parser),
// so splitting on commas is enough here and keeps this test fast.
function csv(text: string): Row[] {
  const [header, ...lines] = text.split('\n').filter((l) => l !== '');
  const columns = header.split(',');
  return lines.map((line) => {
    const cells = line.split(',');
    const row: Row = {};
    columns.forEach((c, i) => {
      row[c] = cells[i];
    });
    return row;
  });
}

// Fisher, Corbet & Williams (1943): S = α ln(1 + N/α), solved for α by bisection on ln α (test-local).
function fisherAlphaOf(counts: readonly number[]): number {
  const S = counts.filter((c) => c > 0).length;
  const N = counts.reduce((a, b) => a + b, 0);
  if (S < 2 || S >= N) throw new Error(`fisherAlphaOf: need 2 <= S < N, got S = ${S}, N = ${N}`);
  let lo = Math.log(1e-6);
  let hi = Math.log(1e7);
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    const a = Math.exp(mid);
    if (a * Math.log(1 + N / a) < S) lo = mid;
    else hi = mid;
  }
  return Math.exp((lo + hi) / 2);
}

interface Fit {
  readonly coef: readonly number[]; // on x − mean(x)
  readonly se: readonly number[];
  readonly xMean: number;
}

// Ordinary least squares y = Σ bⱼ (x − x̄)ʲ by normal equations (well conditioned on centred x in [0, 1]); SEs from s² (XᵀX)⁻¹.
function polyFit(xs: readonly number[], ys: readonly number[], degree: 1 | 2): Fit {
  const n = xs.length;
  const p = degree + 1;
  const xMean = xs.reduce((a, b) => a + b, 0) / n;
  const rows = xs.map((x) => Array.from({ length: p }, (_, j) => (x - xMean) ** j));
  const xtx = Array.from({ length: p }, (_, i) => Array.from({ length: p }, (_, j) => rows.reduce((a, r) => a + r[i] * r[j], 0)));
  const xty = Array.from({ length: p }, (_, i) => rows.reduce((a, r, k) => a + r[i] * ys[k], 0));
  const inv = invert(xtx);
  const coef = inv.map((row) => row.reduce((a, v, j) => a + v * xty[j], 0));
  const rss = rows.reduce((a, r, k) => a + (ys[k] - r.reduce((s, v, j) => s + v * coef[j], 0)) ** 2, 0);
  const s2 = rss / (n - p);
  return { coef, se: inv.map((row, i) => Math.sqrt(s2 * row[i])), xMean };
}

// Gauss–Jordan inverse of a small symmetric positive definite matrix.
function invert(m: readonly (readonly number[])[]): number[][] {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    const pivot = a[c][c];
    for (let j = 0; j < 2 * n; j++) a[c][j] /= pivot;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((row) => row.slice(n));
}

interface PlotFigures {
  readonly plotId: string;
  readonly type: string;
  readonly index: number;
  readonly alpha: number;
  readonly pioneerShare: number;
}

const PLOTS = 600;
let dir: string;
let result: GenerateResult;
let figures: PlotFigures[];
let latest: PlotFigures[];

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'demo-inventory-signal-'));
  result = await generateInventory({ outDir: dir, plots: PLOTS, seed: 2024 });
  const plots = csv(await readFile(result.files.plots, 'utf8'));
  const trees = csv(await readFile(result.files.trees, 'utf8'));
  const species = csv(await readFile(result.files.species, 'utf8'));
  const accepted = new Map<string, Row>();
  for (const s of species) {
    accepted.set(s.name, s);
    for (const syn of s.synonyms.split(';').filter(Boolean)) accepted.set(syn, s);
  }
  // Unidentified per the outputs spec: empty, indet, unknown (any case) or "Genus sp.".
  const unidentified = (name: string) => name === '' || /^(indet|unknown)$/i.test(name) || / sp\.$/.test(name);
  const ba = (dbh: string) => Math.PI * (Number(dbh) / 200) ** 2;
  figures = figuresOf(plots, trees);
  // The latest visit of each plot: the second where the plot was re-measured (what the pipeline fits).
  const laterPlots = csv(await readFile(result.files.secondVisitPlots, 'utf8'));
  const remeasured = new Set(laterPlots.map((p) => p.plot_id));
  const laterTrees = csv(await readFile(result.files.secondVisitTrees, 'utf8'));
  latest = figuresOf(
    [...plots.filter((p) => !remeasured.has(p.plot_id)), ...laterPlots],
    [...trees.filter((t) => !remeasured.has(t.plot_id)), ...laterTrees],
  );

  function figuresOf(plots: Row[], trees: Row[]): PlotFigures[] {
  const stemsOf = new Map<string, Row[]>();
  for (const t of trees) {
    const list = stemsOf.get(t.plot_id);
    if (list) list.push(t);
    else stemsOf.set(t.plot_id, [t]);
  }

  return plots.map((p) => {
    let live = 0;
    let logged = 0;
    let fireSum = 0;
    let pioneer = 0;
    const counts = new Map<string, number>();
    for (const t of stemsOf.get(p.plot_id) ?? []) {
      if (t.in_subplot === '1') continue;
      // A stump's recorded diameter is its cut surface: DBH = 0.8 × it (the default of docs/methods.md#stump-diameter-to-dbh).
      if (t.status === 'stump' && t.stump_cause === 'logged') logged += ba(String(0.8 * Number(t.dbh_cm)));
      if (t.status !== 'live') continue;
      live += ba(t.dbh_cm);
      fireSum += ba(t.dbh_cm) * Number(t.fire_damage);
      if (accepted.get(t.species)?.guild === 'pioneer') pioneer += ba(t.dbh_cm);
      if (unidentified(t.species)) continue;
      const key = accepted.get(t.species)?.name ?? t.species;
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    const logging = (Math.min(1, logged / (live + logged) / 0.5) + Number(p.logging_class) / 3) / 2;
    const fire = (fireSum / live / 3 + Number(p.fire_class) / 3) / 2;
    return {
      plotId: p.plot_id,
      type: p.forest_type,
      index: 1 - (1 - logging) * (1 - fire),
      alpha: fisherAlphaOf([...counts.values()]),
      pioneerShare: pioneer / live,
    };
  });
}
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

const ofType = (t: string) => figures.filter((f) => f.type === t);

describe('fisherAlphaOf (test-local helper)', () => {
  it('matches Fisher et al. 1943: N = 100000, S = 100 → α = 10.96716 by the equation (docs/methods.md#fishers-alpha, computed; 1e-5 relative)', () => {
    const counts = [...new Array<number>(99).fill(1), 100_000 - 99];
    expect(Math.abs(fisherAlphaOf(counts) / 10.96716 - 1)).toBeLessThan(1e-5);
  });

  it('matches the worked example N = 60, S = 18 → α = 8.7185298805 (docs/methods.md#fishers-alpha, computed; 1e-8)', () => {
    const counts = [19, 12, 7, 3, 3, 2, 2, 2, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1];
    expect(fisherAlphaOf(counts)).toBeCloseTo(8.7185298805, 8);
  });
});

describe('planted signal in 600 plots (200 per forest type) read back from the files', () => {
  it('computes from the files exactly the index the generator planted against', () => {
    const flora = buildFlora();
    for (let i = 0; i < 60; i++) {
      const planted = generatePlot({ seed: 2024, flora, heightsFraction: 0.2 }, i);
      const read = figures.find((f) => f.plotId === planted.row.plotId)!;
      expect(read.index).toBeCloseTo(planted.realised.disturbanceIndex, 9);
    }
  });

  it('realises indices that track the latent disturbance (truth.json correlation above 0.97 per type)', () => {
    for (const t of ['wet', 'moist', 'dry'] as const) {
      const s = result.truth.disturbance.by_forest_type[t];
      expect(s.plots).toBe(200);
      expect(s.correlation_latent_vs_index).toBeGreaterThan(0.97);
      expect(s.index_max! - s.index_min!).toBeGreaterThan(0.8);
    }
  });

  it('wet: a quadratic fit has a maximum within ±0.05 of the planted vertex', () => {
    const rows = ofType('wet');
    const fit = polyFit(rows.map((r) => r.index), rows.map((r) => r.alpha), 2);
    const vertex = fit.xMean - fit.coef[1] / (2 * fit.coef[2]);
    expect(fit.coef[2]).toBeLessThan(0);
    expect(fit.coef[2] / fit.se[2]).toBeLessThan(-5);
    expect(Math.abs(vertex - PLANTED_CURVES.wet.vertex!)).toBeLessThan(0.05);
  });

  it('moist: alpha declines with disturbance, near the planted slope', () => {
    const rows = ofType('moist');
    const fit = polyFit(rows.map((r) => r.index), rows.map((r) => r.alpha), 1);
    expect(fit.coef[1] / fit.se[1]).toBeLessThan(-8);
    expect(Math.abs(fit.coef[1] + PLANTED_CURVES.moist.parameters.b)).toBeLessThan(6);
  });

  it('dry: alpha has no clear relation to disturbance (|slope| under 3 SE and under 20 % of the mean)', () => {
    const rows = ofType('dry');
    const fit = polyFit(rows.map((r) => r.index), rows.map((r) => r.alpha), 1);
    expect(Math.abs(fit.coef[1] / fit.se[1])).toBeLessThan(3);
    expect(Math.abs(fit.coef[1])).toBeLessThan(0.2 * fit.coef[0]);
    expect(Math.abs(fit.coef[0] - PLANTED_CURVES.dry.parameters.a)).toBeLessThan(1.5);
  });

  it('shifts basal area to pioneers as disturbance grows, in every forest type', () => {
    for (const t of ['wet', 'moist', 'dry']) {
      const rows = ofType(t);
      const fit = polyFit(rows.map((r) => r.index), rows.map((r) => r.pioneerShare), 1);
      expect(fit.coef[1] / fit.se[1]).toBeGreaterThan(5);
    }
  });
});

describe('planted signal on the latest visit of each plot (the second where re-measured), as the pipeline fits it', () => {
  const ofTypeLatest = (t: string) => latest.filter((f) => f.type === t);
  it('wet: a hump with its maximum within ±0.05 of the planted vertex; moist: a decline near the planted slope; dry: flat', () => {
    const wet = ofTypeLatest('wet');
    const q = polyFit(wet.map((r) => r.index), wet.map((r) => r.alpha), 2);
    expect(q.coef[2] / q.se[2]).toBeLessThan(-5);
    expect(Math.abs(q.xMean - q.coef[1] / (2 * q.coef[2]) - PLANTED_CURVES.wet.vertex!)).toBeLessThan(0.05);
    const moist = ofTypeLatest('moist');
    const m = polyFit(moist.map((r) => r.index), moist.map((r) => r.alpha), 1);
    expect(m.coef[1] / m.se[1]).toBeLessThan(-8);
    expect(Math.abs(m.coef[1] + PLANTED_CURVES.moist.parameters.b)).toBeLessThan(6);
    const dry = ofTypeLatest('dry');
    const d = polyFit(dry.map((r) => r.index), dry.map((r) => r.alpha), 1);
    expect(Math.abs(d.coef[1] / d.se[1])).toBeLessThan(3);
  });
});
