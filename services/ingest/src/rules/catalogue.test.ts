import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ALL_RULES } from '@stemwise/core';

describe('the rules catalogue', () => {
  it('has unique lower_snake_case codes, each prefixed by its family', () => {
    const codes = ALL_RULES.map((r) => r.code);
    expect(new Set(codes).size).toBe(codes.length);
    for (const r of ALL_RULES) expect(r.code).toMatch(new RegExp(`^${r.family}_[a-z0-9_]+$`));
  });

  it('gives warnings only to plausibility rules and three advisory checks', () => {
    const warnings = ALL_RULES.filter((r) => r.severity === 'warning').map((r) => r.code);
    expect(warnings.filter((c) => !c.startsWith('plausibility_')).sort()).toEqual(['cross_main_stem_below_min', 'cross_plot_without_stems', 'structure_unknown_column']);
  });

  it('is documented in RULES.md, every code with its severity, and nothing more', () => {
    const doc = fs.readFileSync(path.resolve(__dirname, '../../RULES.md'), 'utf8');
    const rows = [...doc.matchAll(/^\| `([a-z0-9_]+)` \| (error|warning) \|/gm)].map((m) => [m[1], m[2]]);
    expect(rows.sort()).toEqual(ALL_RULES.map((r) => [r.code, r.severity]).sort());
  });
});
