import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { batchReport, type ServiceDeps } from '@stemwise/core';
import { recomputeInProcess } from '../compute/support';
import { useServices, type TestServices } from '../support/services';
import { depsFor, ingestDir, PLOTS, SPECIES, tempDir, TREES, writeUpload } from './support';

// The species warnings of a batch and its unresolved-names list (computed later by the plot metrics)
// follow one rule and one count. The reference list (SPECIES) knows the genera Ossara and Tikka.
// In trees.csv: "Ossara alba" — genus listed, species not — on a live, a dead, a stump, a
// below-minimum and a subplot stem (5 stems) plus one row with an error (skipped, not counted);
// "Quill aurea" — nothing listed — on 2 stems (live and dead); "Ossara sp." — named only to a listed
// genus; "Brindle sp." — named only to a genus the list does not know.
const EXTRA = [
  'MW-001,11,Ossara alba,24.5,,live,,0,0',
  'MW-001,12,Ossara alba,30,,dead,,0,0',
  'MW-001,13,Ossara alba,20,,stump,logged,0,0',
  'MW-001,14,Ossara alba,7.5,,live,,0,0',
  'MW-001,15,Ossara alba,6,,live,,0,1',
  'MW-001,16,Ossara alba,0,,live,,0,0',
  'MW-002,11,Quill aurea,20,,dead,,0,0',
  'MW-003,11,Brindle sp.,15,,live,,0,0',
];

describe('species warnings and the unresolved-names list', () => {
  let s: TestServices;
  let deps: ServiceDeps;
  beforeAll(async () => {
    s = await useServices({ STEMWISE_BOOTSTRAP: '50' });
    deps = depsFor({ ...s.config, storageDir: tempDir() }, s.db);
  });
  afterAll(async () => s?.cleanup());

  it('tell a listed genus from nothing known, and count the same stems as the list', async () => {
    const files = { plots: PLOTS, trees: [TREES, ...EXTRA].join('\n'), species: SPECIES };
    const { submitted, report } = await ingestDir(deps, writeUpload(files), { skipInvalid: true });
    expect(report.state).toBe('loaded');
    expect(report.counts.rowsSkipped).toBe(1);

    const warning = (rule: string) => report.issues.find((g) => g.rule === rule)?.first ?? [];
    const genusKnown = warning('plausibility_species_genus_known');
    expect(genusKnown.map((w) => [w.value, w.line])).toEqual([['Ossara alba', 11]]);
    expect(genusKnown[0].message).toBe(
      'species "Ossara alba" is not in the reference list, but its genus Ossara is; stems keep the name, count as unassigned to a species and take the genus\'s mean wood density (5 stems)',
    );
    const unknown = warning('plausibility_species_unknown');
    expect(unknown.map((w) => [w.value, w.line])).toEqual([['Quill aurea', 9], ['Brindle sp.', 18]]);
    expect(unknown[0].message).toBe('species "Quill aurea" is not in the reference list, and neither is its genus; stems keep the name but count as unassigned (2 stems)');
    const genusOnly = warning('plausibility_species_genus_only');
    expect(genusOnly.map((w) => [w.value, w.message])).toEqual([['Ossara sp.', 'species "Ossara sp." is identified only to the genus Ossara (1 stem)']]);

    const { failures } = await recomputeInProcess(s.config, s.db);
    expect(failures).toEqual([]);
    const computed = (await batchReport(s.db, submitted.batchId))!;
    expect(computed.unresolvedNames).toEqual([
      { name: 'Ossara alba', level: 'genus', stems: 5 },
      { name: 'Quill aurea', level: 'unresolved', stems: 2 },
    ]);
    // The same names and counts as the warnings of the two rules, but for the name that declares
    // itself identified only to a genus (not a failure to resolve a species).
    const stemsOf = (m: string) => Number(/\((\d+) stems?\)$/.exec(m)![1]);
    expect([...genusKnown, ...unknown].filter((w) => w.value !== 'Brindle sp.').map((w) => ({ name: w.value, stems: stemsOf(w.message) }))).toEqual(
      computed.unresolvedNames.map((u) => ({ name: u.name, stems: u.stems })),
    );
  });
});
