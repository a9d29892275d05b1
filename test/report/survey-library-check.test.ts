import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { stratifiedEstimate } from '@stemwise/core';

// Our stratified estimator against a general-purpose survey-statistics library on an open data set:
// the R package `survey` 4.1.1 (Lumley), data set `apistrat` (a stratified random sample of 200
// California schools from the Academic Performance Index 2000, public data of the California
// Department of Education, shipped with the package), variable api00, strata stype (E, M, H) with
// population sizes fpc = 4421, 1018, 755. Values printed by R 4.2.2 on this machine (read):
//   svymean(~api00, svydesign(id=~1, strata=~stype, fpc=~fpc, data=apistrat))  → 662.2873635777, SE 9.4089408794
//   the same design with weights fpc/n_h and no fpc                             → 662.2873635777, SE 9.5361323730
//   svytotal(~api00, …fpc…) → 4102207.93, SE 58278.979807; without fpc SE 59066.803918
// The fixture test/report/fixtures/apistrat.csv holds stype, api00 and fpc of the 200 schools.
const rows = fs
  .readFileSync(path.join(__dirname, 'fixtures', 'apistrat.csv'), 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((l) => l.split(','));
const strata = ['E', 'H', 'M'].map((name) => {
  const mine = rows.filter((r) => r[0] === name);
  return { name, values: mine.map((r) => Number(r[1])), size: Number(mine[0][2]) };
});

describe('stratified estimates agree with the R survey package on apistrat', () => {
  it('has the 200 schools in three strata', () => {
    expect(strata.map((s) => s.values.length)).toEqual([100, 50, 50]);
  });

  it('with the finite population correction (one school per unit)', () => {
    const e = stratifiedEstimate(strata, { fpcUnitSize: 1 });
    expect(e.fpcApplied).toBe(true);
    expect(e.mean!).toBeCloseTo(662.2873635777, 8);
    expect(Math.abs(e.se! / 9.4089408794 - 1)).toBeLessThan(1e-9);
    expect(e.total!).toBeCloseTo(4102207.93, 4);
    expect(Math.abs(e.totalSe! / 58278.979807 - 1)).toBeLessThan(1e-9);
  });

  it('without it (the default: plots are a negligible share of a forest)', () => {
    const e = stratifiedEstimate(strata);
    expect(e.fpcApplied).toBe(false);
    expect(e.mean!).toBeCloseTo(662.2873635777, 8);
    expect(Math.abs(e.se! / 9.536132373 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(e.totalSe! / 59066.803918 - 1)).toBeLessThan(1e-9);
  });
});
