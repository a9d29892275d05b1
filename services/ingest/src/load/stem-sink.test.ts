import { describe, expect, it } from 'vitest';
import { STEM_COPY_COLUMNS, STEM_FIELDS } from '@stemwise/db';
import { copyLine, type StemRecord } from './stem-sink';

const STEM: StemRecord = { visitId: 12, treeId: 'T\t1', species: 'Vexa borealis', dbhCm: 23.5, heightM: null, status: 'stump', stumpCause: 'logged', fireDamage: 2, inSubplot: true };

describe('the stem record', () => {
  it('has one field per stems column, in the COPY column order', () => {
    expect(STEM_COPY_COLUMNS).toEqual(['visit_id', 'tree_id', 'species', 'dbh_cm', 'height_m', 'status', 'stump_cause', 'fire_damage', 'in_subplot']);
    expect(STEM_FIELDS).toEqual(Object.keys(STEM));
  });

  it('becomes one line of COPY text with its fields in that order (tab escaped, null as \\N)', () => {
    const line = copyLine(STEM);
    expect(line).toBe('12\tT\\t1\tVexa borealis\t23.5\t\\N\tstump\tlogged\t2\tt\n');
    expect(line.slice(0, -1).split('\t')).toHaveLength(STEM_COPY_COLUMNS.length);
    expect(copyLine({ ...STEM, treeId: 'a\\b', species: null, heightM: 18, status: 'live', stumpCause: null, inSubplot: false })).toBe('12\ta\\\\b\t\\N\t23.5\t18\tlive\t\\N\t2\tf\n');
  });
});
