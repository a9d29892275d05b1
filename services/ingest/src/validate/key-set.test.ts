import { describe, expect, it } from 'vitest';
import { KeySet } from './key-set';

describe('KeySet', () => {
  it('finds every repeated key with the line it was first seen on, through many growths', () => {
    const set = new KeySet(16);
    for (let i = 0; i < 200_000; i++) expect(set.add(`P${i % 997}\u0000T${i}`, i + 2)).toBe(0);
    expect(set.size).toBe(200_000);
    expect(set.add('P5\u0000T5', 999_999)).toBe(7);
    expect(set.add(`P${199_999 % 997}\u0000T199999`, 5)).toBe(200_001);
    expect(set.add('P0\u0000T200000', 3)).toBe(0);
    expect(set.add('stored', -1)).toBe(0);
    expect(set.add('stored', 9)).toBe(-1);
  });
});
