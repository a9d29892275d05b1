import { describe, expect, it } from 'vitest';
import { formatBytes, progressBars, progressLine } from './report-text';

describe('progress for people', () => {
  it('draws three bars: bytes read of the total, rows checked, rows loaded', () => {
    const bars = progressBars({ bytesTotal: 1_000_000, bytesRead: 500_000, rowsChecked: 10_000, rowsLoaded: 5_000 });
    expect(bars).toEqual([
      'read    [############............]  50%  500.0 kB of 1.0 MB',
      'checked [############............] 10,000 rows',
      'loaded  [######..................] 5,000 rows',
    ]);
  });
  it('writes a plain line where no terminal is attached', () => {
    expect(progressLine({ bytesTotal: 2_500_000_000, bytesRead: 999, rowsChecked: 1, rowsLoaded: 0 })).toBe('progress: read 999 B of 2.50 GB, checked 1 rows, loaded 0 rows');
    expect(formatBytes(27_300_000)).toBe('27.3 MB');
  });
});
