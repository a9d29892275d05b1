import { describe, expect, it } from 'vitest';
import { stageTimeLines } from './stage-times';

describe('stage times of a recompute run', () => {
  it('prints one line per recorded stage in run order, with its counts, and the total from the first start to the last end', () => {
    const lines = stageTimeLines({
      // Recorded out of order (details are a JSON object): printed in the run's order.
      summaries: { start: 10_000, ms: 350, regions: 12, versions: 1 },
      plan: { start: 1_000, ms: 420, visits: 8000, chunks: 16, heightModels: 3 },
      metrics: { start: 1_500, ms: 4_100, visits: 8000, stems: 1_358_741, chunks: 16, chunkMs: 7_900 },
      fits: { start: 5_700, ms: 700, forestTypes: 3 },
    });
    expect(lines).toEqual([
      'stage times (wall clock):',
      '  plan            0.42 s  8000 plot visits in 16 chunks, 3 height models checked',
      '  plot metrics    4.10 s  8000 plot visits, 1358741 stems, 16 chunks (7.90 s of chunk work)',
      '  fits            0.70 s  3 forest types',
      '  summaries       0.35 s  12 regions, 1 new version',
      '  total           9.35 s',
    ]);
  });

  it('shows the stages a run recorded so far (a failed run), and nothing for a run that recorded none', () => {
    const lines = stageTimeLines({ plan: { start: 0, ms: 10, visits: 1, chunks: 1, heightModels: 0 } });
    expect(lines).toEqual(['stage times (wall clock):', '  plan            0.01 s  1 plot visit in 1 chunk, 0 height models checked', '  total           0.01 s']);
    expect(stageTimeLines(undefined)).toEqual([]);
    expect(stageTimeLines({})).toEqual([]);
  });
});
