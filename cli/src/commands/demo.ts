import fs from 'node:fs';
import path from 'node:path';
import { defineCommand } from '../command';
import { printErr, printOut } from '../output';
import { OWN_FOLDER_MARKER } from '../own-folder';
import { DEMO_CHANGE_VARIABLES, runDemo, type DemoResult } from '../demo-pipeline';
import { demoCarbonLines } from '../demo-carbon';

const fmt = (x: number | null, digits = 3) => (x === null || x === undefined ? '—' : x.toFixed(digits));

export function demoTable(r: DemoResult): string {
  const lines = [
    `plots ${r.plots}, stems ${r.stems}, regions ${r.regions}${r.batches > 1 ? `; ${r.batches - 1} later visit batch(es) re-measuring plots` : ''}; ${r.seconds.toFixed(1)} s`,
    '',
    'forest type  plots  verdict      peak (95 % interval)      R²',
  ];
  for (const f of r.fits) {
    const peak = f.peakX === null ? '—' : `${fmt(f.peakX)} (${fmt(f.peakLow)}–${fmt(f.peakHigh)})`;
    lines.push(`${f.forestType.padEnd(12)} ${String(f.n).padStart(5)}  ${f.verdict.padEnd(12)} ${peak.padEnd(25)} ${fmt(f.r2, 2)}`);
  }
  return lines.join('\n');
}

/** Planted change per forest type and variable, as truth.json of the demo inventory gives it (change.expected). */
export type PlantedChangeTable = Record<string, Partial<Record<(typeof DEMO_CHANGE_VARIABLES)[number], { mean: number; se: number }>>>;

const CHANGE_LABELS: Record<(typeof DEMO_CHANGE_VARIABLES)[number], { label: string; digits: number; scale: number }> = {
  mortality_annual: { label: 'mortality %/yr', digits: 2, scale: 100 },
  recruitment_annual: { label: 'recruitment %/yr', digits: 2, scale: 100 },
  carbon_net_change_mg_ha_yr: { label: 'net carbon Mg C/ha/yr', digits: 2, scale: 1 },
};

/** Planted against recovered change per forest type: the national estimate with its 95 % interval. */
export function demoChangeTable(r: DemoResult, planted: PlantedChangeTable | null): string {
  if (r.change.length === 0) return 'No plot was measured twice: no change between visits to show.';
  const lines = ['forest type  variable                 plots  planted   recovered (95 % interval)'];
  const types = [...new Set(r.change.map((c) => c.forestType))];
  for (const type of types) {
    for (const variable of DEMO_CHANGE_VARIABLES) {
      const c = r.change.find((x) => x.forestType === type && x.variable === variable);
      if (!c) continue;
      const { label, digits, scale } = CHANGE_LABELS[variable];
      const f = (x: number | null | undefined) => (x === null || x === undefined ? '—' : (x * scale).toFixed(digits));
      const p = planted?.[type]?.[variable]?.mean;
      lines.push(`${type.padEnd(12)} ${label.padEnd(24)} ${String(c.n).padStart(5)}  ${f(p).padStart(7)}   ${f(c.mean)} (${f(c.ciLow)} to ${f(c.ciHigh)})`);
    }
  }
  return lines.join('\n');
}

/** The planted change of a generated inventory's truth.json, or null when it has none. */
export function readPlantedChange(dataDir: string): PlantedChangeTable | null {
  const file = path.join(dataDir, 'truth.json');
  if (!fs.existsSync(file)) return null;
  const truth = JSON.parse(fs.readFileSync(file, 'utf8')) as { change?: { expected?: { by_forest_type?: PlantedChangeTable } | null } };
  return truth.change?.expected?.by_forest_type ?? null;
}

export const command = defineCommand({
  usage: `usage: stemwise demo [--out DIR] [--data DIR]

Runs the whole pipeline on the invented demo inventory (or the upload folder --data DIR) in an
embedded database of its own, and writes a report folder: pages, exports and charts.
  --out DIR    the report folder (default demo-report). It must be missing, empty, or one that
               stemwise demo wrote before (it holds a ${OWN_FOLDER_MARKER} file; it is emptied and
               written again). Any other folder is refused with exit code 2, and nothing is deleted;
               the same holds for its database folder, STEMWISE_DATA_DIR/demo.
  --data DIR   plots.csv and trees.csv (optionally strata.csv, species.csv; each may be .gz); a
               folder second-visit in it, with the plots.csv and trees.csv of re-measured plots,
               is uploaded after them as the next visit
`,
  options: { out: { type: 'string', default: 'demo-report' }, data: { type: 'string' } },
  async run({ values }, rt) {
    const { DEMO_DATA_DIR, SECOND_VISIT_DIR } = await import('@stemwise/demo-inventory');
    const outDir = path.resolve(values.out);
    const dataDir = path.resolve(values.data ?? DEMO_DATA_DIR);
    const later = path.join(dataDir, SECOND_VISIT_DIR);
    const tty = process.stderr.isTTY;
    const result = await runDemo({
      inputDir: dataDir,
      laterDirs: fs.existsSync(later) ? [later] : [],
      outDir,
      workDir: path.join(rt.config.dataDir, 'demo'),
      // In text format the log shows warnings only, so the demo's own progress lines stay readable.
      log: rt.log,
      base: rt.config,
      step: (m) => printErr(`${tty ? '\u2192 ' : ''}${m}\n`),
    });
    printOut(
      [
        `Diversity (Fisher's alpha) against the disturbance index, invented demo inventory:`,
        demoTable(result),
        ...demoCarbonLines(result.carbon),
        ...demoCarbonLines(result.treeCarbon),
        ...demoCarbonLines(result.carbonChange),
        ...demoCarbonLines(result.treeCarbonChange),
        '',
        'Change between visits, per forest type: planted (expected value under the planted process, from an',
        'independent simulation; truth.json) against recovered (national estimate over re-measured plots):',
        demoChangeTable(result, readPlantedChange(dataDir)),
        '',
        `Report: ${result.index}`,
        `Exports and charts: ${path.join(outDir, 'exports')}, ${path.join(outDir, 'charts')}`,
        'These are sample-based estimates of invented data; see the cautions on each page.',
        '',
      ].join('\n'),
    );
    return 0;
  },
});
