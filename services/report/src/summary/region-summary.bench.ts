// Speed of summariseRegion on a large invented region. Run: npx vitest bench --run services/report/src/summary
import { bench, describe } from 'vitest';
import { DEFAULT_REGION_VARIABLES, summariseRegion, type PlotMetrics } from './region-summary';

function invented(nPlots: number, nTypes: number): PlotMetrics[] {
  let seed = 12345;
  const next = (): number => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed / 2147483648;
  };
  return Array.from({ length: nPlots }, (_, i) => {
    const values: Record<string, number | null> = {};
    for (const v of DEFAULT_REGION_VARIABLES) values[v] = v === 'fisher_alpha' && next() < 0.1 ? null : next() * 100;
    values.disturbance_index = next();
    return {
      plotId: `P${i}`,
      forestType: `type_${i % nTypes}`,
      values,
      speciesNames: Array.from({ length: 40 }, () => `Inventa sp${Math.floor(next() * 300)}`),
    };
  });
}

const plots = invented(5000, 8);
const forestAreas = Object.fromEntries(Array.from({ length: 8 }, (_, h) => [`type_${h}`, 10000 + 1000 * h]));

describe('summariseRegion', () => {
  bench('5000 plots, 8 forest types, 13 variables, 40 names per plot', () => {
    summariseRegion({ region: 'Inventa', plots, forestAreas });
  });
});
