// `npm run bench -- --only verdict`: times fitCurves on one forest type's worth
// of plots (10,000 points, planted hump, so every test and the 1000-resample bootstrap run) and the
// bootstrap alone. Speed is measured here, never in the test suite.
import { bootstrapVertexInterval, fitCurves } from '@stemwise/core/science';
import { simulateCurve } from '../../core/test/random-test-data';

function time(label: string, runs: number, f: () => unknown): void {
  f(); // warm-up
  const t0 = performance.now();
  for (let i = 0; i < runs; i++) f();
  console.log(`${label}: ${((performance.now() - t0) / runs).toFixed(1)} ms per run (${runs} runs)`);
}

for (const n of [1_000, 10_000]) {
  const pts = simulateCurve(n, (x) => 10 + 8 * x - 8 * x * x, 3, 1);
  const x = pts.map((p) => p.x);
  const y = pts.map((p) => p.y);
  console.log(`n = ${n}: verdict ${fitCurves(pts).verdict}`);
  time(`  fitCurves, bootstrapN 1000`, 5, () => fitCurves(pts));
  time(`  fitCurves, no bootstrap`, 5, () => fitCurves(pts, { bootstrapN: 0 }));
  time(`  bootstrapVertexInterval, 1000 resamples`, 5, () => bootstrapVertexInterval(x, y, { replicates: 1000, seed: 1 }));
}
