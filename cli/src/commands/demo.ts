import path from 'node:path';
import { defineCommand } from '../command';
import { printErr, printOut } from '../output';
import { OWN_FOLDER_MARKER } from '../own-folder';
import { runDemo, type DemoResult } from '../demo-pipeline';
import { demoCarbonLines } from '../demo-carbon';

const fmt = (x: number | null, digits = 3) => (x === null || x === undefined ? '—' : x.toFixed(digits));

export function demoTable(r: DemoResult): string {
  const lines = [
    `plots ${r.plots}, stems ${r.stems}, regions ${r.regions}; ${r.seconds.toFixed(1)} s`,
    '',
    'forest type  plots  verdict      peak (95 % interval)      R²',
  ];
  for (const f of r.fits) {
    const peak = f.peakX === null ? '—' : `${fmt(f.peakX)} (${fmt(f.peakLow)}–${fmt(f.peakHigh)})`;
    lines.push(`${f.forestType.padEnd(12)} ${String(f.n).padStart(5)}  ${f.verdict.padEnd(12)} ${peak.padEnd(25)} ${fmt(f.r2, 2)}`);
  }
  return lines.join('\n');
}

export const command = defineCommand({
  usage: `usage: stemwise demo [--out DIR] [--data DIR]

Runs the whole pipeline on the invented demo inventory (or the upload folder --data DIR) in an
embedded database of its own, and writes a report folder: pages, exports and charts.
  --out DIR    the report folder (default demo-report). It must be missing, empty, or one that
               stemwise demo wrote before (it holds a ${OWN_FOLDER_MARKER} file; it is emptied and
               written again). Any other folder is refused with exit code 2, and nothing is deleted;
               the same holds for its database folder, STEMWISE_DATA_DIR/demo.
  --data DIR   plots.csv and trees.csv (optionally strata.csv, species.csv; each may be .gz)
`,
  options: { out: { type: 'string', default: 'demo-report' }, data: { type: 'string' } },
  async run({ values }, rt) {
    const { DEMO_DATA_DIR } = await import('@stemwise/demo-inventory');
    const outDir = path.resolve(values.out);
    const tty = process.stderr.isTTY;
    const result = await runDemo({
      inputDir: path.resolve(values.data ?? DEMO_DATA_DIR),
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
