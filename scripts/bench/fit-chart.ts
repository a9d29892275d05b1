// `npm run bench -- --only fit-chart`: time to render one fit chart to SVG
// (target about 100 ms) for 300 and 3,000 plots. Speed is measured here, never in the test suite.
import { fitChartData } from '@stemwise/core';
import { renderFitChartSvg } from '@stemwise/core/charts';
import { fitCurves } from '@stemwise/core/science';
import { simulateCurve } from '../../core/test/random-test-data';

for (const n of [300, 3_000]) {
  const points = simulateCurve(n, (x) => 10 + 8 * x - 8 * x * x, 1, 2).map((p, i) => ({ ...p, highlight: i % 20 === 0 }));
  const fit = fitCurves(points, { bootstrapN: 200 });
  const input = { forestType: 'Lowland moist', metric: 'fisher_alpha', axis: 'disturbance_index', points, chart: fitChartData(fit) };
  await renderFitChartSvg(input); // warm-up
  const runs = 10;
  const t0 = performance.now();
  let bytes = 0;
  for (let i = 0; i < runs; i++) bytes = (await renderFitChartSvg(input)).length;
  console.log(`${n} plots: ${((performance.now() - t0) / runs).toFixed(1)} ms per chart, ${(bytes / 1024).toFixed(0)} KiB of SVG`);
}
