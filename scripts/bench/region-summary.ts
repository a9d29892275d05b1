// `npm run bench -- --only region-summary`: speed of summariseRegion on a large invented region (no database).
import { DEFAULT_REGION_VARIABLES } from '@stemwise/core';
import { summariseRegion, type PlotMetrics } from '@stemwise/report';

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

const run = () => summariseRegion({ region: 'Inventa', plots, forestAreas });
run(); // warm-up
const runs = 20;
const t0 = performance.now();
for (let i = 0; i < runs; i++) run();
console.log(`summariseRegion, 5000 plots, 8 forest types, ${DEFAULT_REGION_VARIABLES.length} variables, 40 names per plot: ${((performance.now() - t0) / runs).toFixed(1)} ms per run (${runs} runs)`);
