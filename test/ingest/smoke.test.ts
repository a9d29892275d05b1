import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '@stemwise/platform';
import { useServices, type TestServices } from '../support/services';
import { depsFor, ingestDir, PLOTS, SPECIES, STRATA, TREES, tempDir, writeUpload } from './support';

describe('smoke', () => {
  let s: TestServices;
  beforeAll(async () => void (s = await useServices()));
  afterAll(async () => s?.cleanup());
  it('loads', async () => {
    const config = { ...s.config, storageDir: tempDir() };
    const deps = depsFor(config, s.db);
    const { report } = await ingestDir(deps, writeUpload({ plots: PLOTS, trees: TREES, strata: STRATA, species: SPECIES }));
    console.log(JSON.stringify(report, null, 1));
    expect(report.state).toBe('loaded');
  });
});
