import { describe, expect, it } from 'vitest';
import { crpPartition, PLANTED_CURVES, plantedAlpha, Rng } from '@stemwise/demo-inventory';
import type { ForestType } from '@stemwise/demo-inventory';
import { fisherAlphaFromTotals, fitCurves } from '@stemwise/core';

// Statistical behaviour of the verdicts on data simulated the demo generator's way, with its known
// truth: each plot's target alpha is the generator's planted curve at the plot's disturbance index,
// times its log-normal noise (PLANTED_CURVES[type].noiseSdLog); the plot's ~400 identified stems are
// split into species by the generator's own Chinese restaurant process with that alpha; the plot's
// Fisher's alpha is then computed from its species and stem counts by the pipeline's science.
function simulatePlots(type: ForestType, plots: number, seed: number): Array<{ x: number; y: number }> {
  const rng = new Rng(seed);
  const noise = PLANTED_CURVES[type].noiseSdLog;
  const points: Array<{ x: number; y: number }> = [];
  for (let i = 0; i < plots; i++) {
    const x = rng.uniform(0, 1);
    const alpha = plantedAlpha(type, x) * Math.exp(rng.normal(0, noise));
    const stems = 300 + rng.int(201);
    const { species } = crpPartition(stems, alpha, rng);
    const y = fisherAlphaFromTotals(species, stems);
    if (y !== null) points.push({ x, y });
  }
  return points;
}

describe('diversity–disturbance verdicts on the generator\'s simulated plots', () => {
  it('recovers the planted hump of the wet type within ±0.05 with 800 plots', () => {
    const planted = PLANTED_CURVES.wet.vertex!; // 0.45, the generator's truth
    const errors: number[] = [];
    for (const seed of [101, 202, 303]) {
      const fit = fitCurves(simulatePlots('wet', 800, seed), { seed, bootstrapN: 200 });
      expect(fit.verdict).toBe('hump');
      errors.push(Math.abs(fit.peak!.x - planted));
    }
    console.log(`wet, 800 plots: |vertex − ${planted}| = ${errors.map((e) => e.toFixed(4)).join(', ')}`);
    for (const e of errors) expect(e).toBeLessThanOrEqual(0.05);
  });

  it('says hump in at most 5 % of 200 null data sets (flat dry type, declining moist type)', () => {
    const rates: Record<string, number> = {};
    for (const type of ['dry', 'moist'] as const) {
      let humps = 0;
      for (let k = 0; k < 100; k++) {
        const fit = fitCurves(simulatePlots(type, 150, 10_000 + k), { seed: k, bootstrapN: 0 });
        if (fit.verdict === 'hump') humps++;
      }
      rates[type] = humps / 100;
    }
    const overall = (rates.dry + rates.moist) / 2;
    console.log(`hump verdicts on 200 null sets of 150 plots: dry (flat) ${(rates.dry * 100).toFixed(1)} %, moist (declining) ${(rates.moist * 100).toFixed(1)} %, together ${(overall * 100).toFixed(1)} %`);
    expect(overall).toBeLessThanOrEqual(0.05);
  });
});
