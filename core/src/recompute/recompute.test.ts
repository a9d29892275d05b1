import { describe, expect, it } from 'vitest';
import { recomputeFlow } from './recompute';
import { heightModelFromRow, heightModelRow } from './height-models';
import { fitHeightDiameter } from '../science/height-diameter';

describe('recompute flow', () => {
  it('chains summaries ← fits ← plots ← chunks with deterministic ids and chunks of the given size', () => {
    const flow = recomputeFlow('r1', [1, 2, 3, 4, 5], 2);
    expect(flow).toMatchObject({ name: 'report.summaries', jobId: 'summaries.r1', data: { runId: 'r1' } });
    const fits = flow.children![0];
    expect(fits).toMatchObject({ name: 'compute.fits', jobId: 'fits.r1' });
    const plots = fits.children![0];
    expect(plots).toMatchObject({ name: 'compute.plots', jobId: 'plots.r1' });
    expect(plots.children!.map((c) => [c.jobId, (c.data as { visitIds: number[] }).visitIds])).toEqual([
      ['chunk.r1.0', [1, 2]],
      ['chunk.r1.1', [3, 4]],
      ['chunk.r1.2', [5]],
    ]);
    for (const c of plots.children!) expect(c.jobId).toMatch(/^[A-Za-z0-9._-]+$/);
  });

  it('has a plots stage without children when only fits or summaries are due', () => {
    const plots = recomputeFlow('r2', [], 500).children![0].children![0];
    expect(plots.children).toBeUndefined();
  });
});

describe('stored height model', () => {
  it('reads back exactly as fitted (JSON keeps every double)', () => {
    const d = Array.from({ length: 40 }, (_, i) => 10 + i * 2.5);
    const h = d.map((x, i) => Math.exp(0.9 + 0.7 * Math.log(x) - 0.03 * Math.log(x) ** 2) * (1 + ((i % 5) - 2) * 0.03));
    const m = fitHeightDiameter(d, h);
    const row = JSON.parse(JSON.stringify(heightModelRow('wet', m)));
    expect(heightModelFromRow(row)).toEqual(m);
  });
});
