import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

// The exports of the committed demo inventory, byte for byte, as the command line writes them: a
// refactoring that changes one digit of one figure fails here. The expected files were written by
// `stemwise demo` and `stemwise export … --format json` before the services were laid side by side.
// A deliberate change of the figures (a new column at the end, a corrected method) rewrites them with
// STEMWISE_UPDATE_EXPECTED=1 and says so in its commit message.
const run = promisify(execFile);
const BIN = path.resolve(__dirname, '../../bin/stemwise.mjs');
const EXPECTED = path.resolve(__dirname, 'demo-exports');
const FROM_DEMO = ['plots.csv', 'plots.geojson', 'fits.csv', 'regions.csv', 'change.csv'];
const AS_JSON = ['plots', 'fits', 'regions', 'change'];

describe('the demo inventory exports', () => {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'stemwise-exports-'));
  const written = new Map<string, string>();

  beforeAll(async () => {
    const env = { ...process.env, STEMWISE_DATA_DIR: path.join(root, 'data'), STEMWISE_LOG_LEVEL: 'warn' } as Record<string, string>;
    delete env.DATABASE_URL;
    delete env.REDIS_URL;
    await run(process.execPath, [BIN, 'demo', '--out', path.join(root, 'report')], { env, maxBuffer: 1 << 24 });
    for (const f of FROM_DEMO) written.set(f, path.join(root, 'report', 'exports', f));
    // The demo keeps its embedded database in <data dir>/demo: export from it as a user would.
    const exportEnv = { ...env, STEMWISE_DATA_DIR: path.join(root, 'data', 'demo') };
    for (const kind of AS_JSON) {
      const out = path.join(root, `${kind}.json`);
      await run(process.execPath, [BIN, 'export', kind, '--format', 'json', '--out', out], { env: exportEnv });
      written.set(`${kind}.json`, out);
    }
    if (process.env.STEMWISE_UPDATE_EXPECTED === '1') for (const [name, file] of written) fs.copyFileSync(file, path.join(EXPECTED, name));
  }, 900_000);
  afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

  it.each([...FROM_DEMO, ...AS_JSON.map((k) => `${k}.json`)])('%s is byte-identical to the expected file', (name) => {
    const actual = fs.readFileSync(written.get(name)!);
    const expected = fs.readFileSync(path.join(EXPECTED, name));
    if (!actual.equals(expected)) {
      // Name the first differing line rather than dumping a 400 kB diff.
      const a = actual.toString('utf8').split('\n');
      const e = expected.toString('utf8').split('\n');
      const i = a.findIndex((line, k) => line !== e[k]);
      expect.fail(`${name} differs from the expected file at line ${i + 1}:\n  expected ${JSON.stringify(e[i]?.slice(0, 300))}\n  written  ${JSON.stringify(a[i]?.slice(0, 300))}`);
    }
    expect(actual.length).toBe(expected.length);
  });

  // docs/methods.md#change-between-visits: net change = growth + recruitment − losses, on every re-measured
  // plot of the demo (biomass: died + removed = loss; basal area: growth + recruitment − loss = change).
  it('holds gains minus losses equal to the net change on every demo plot measured twice', () => {
    const rows = JSON.parse(fs.readFileSync(written.get('change.json')!, 'utf8')) as Record<string, number>[];
    const truth = JSON.parse(fs.readFileSync(path.resolve(__dirname, '../../demo-inventory/data/truth.json'), 'utf8'));
    expect(rows.length).toBe(Object.values(truth.change.second_visits.plots_by_forest_type as Record<string, number>).reduce((a, b) => a + b, 0));
    const close = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(a), Math.abs(b));
    for (const r of rows) {
      const at = `${r.plot_id} ${r.date_from}`;
      expect(close(r.agb_loss_mg_ha_yr, r.agb_died_mg_ha_yr + r.agb_removed_mg_ha_yr), at).toBe(true);
      expect(close(r.agb_net_change_mg_ha_yr, r.agb_growth_mg_ha_yr + r.agb_recruitment_mg_ha_yr - r.agb_loss_mg_ha_yr), at).toBe(true);
      expect(close(r.ba_change_m2_ha_yr, r.ba_growth_m2_ha_yr + r.ba_recruitment_m2_ha_yr - r.ba_loss_m2_ha_yr), at).toBe(true);
      expect(close(r.carbon_net_change_mg_ha_yr, 0.47 * r.agb_net_change_mg_ha_yr), at).toBe(true);
      expect(r.n_start).toBe(r.n_survivors + r.n_died + r.n_removed);
    }
  });
});
