import { checkFitColumn, type ExportTarget } from '@stemwise/core';
import { StemwiseError } from '@stemwise/platform';
import { defineCommand, usageError } from '../command';
import { printErr } from '../output';

const KINDS = ['plots', 'change', 'fits', 'regions'] as const;
const FORMATS: Record<(typeof KINDS)[number], readonly string[]> = { plots: ['csv', 'json', 'geojson'], change: ['csv', 'json', 'geojson'], fits: ['csv', 'json'], regions: ['csv', 'json'] };

export const command = defineCommand({
  usage: `usage: stemwise export plots|change|fits|regions [--format F] [--out FILE] [--axis A] [--metric M] [--region R]

Writes results to FILE, or to stdout (the data as stored, byte for byte: see docs/exports.md).
  plots     one row per plot visit; --format csv, json or geojson; --region R for one region
  change    one row per plot and pair of consecutive visits: mortality, recruitment, growth, carbon
            change; --format csv, json or geojson; --region R for one region
  fits      the diversity–disturbance curve fits; --format csv or json; --axis and --metric for one pair
  regions   the per-region estimates; --format csv or json; --region R for one region
`,
  options: {
    format: { type: 'string' },
    out: { type: 'string' },
    axis: { type: 'string' },
    metric: { type: 'string' },
    region: { type: 'string' },
  },
  positionals: true,
  async run({ positionals, values }, rt) {
    const kind = positionals[0] as (typeof KINDS)[number] | undefined;
    if (!kind || !KINDS.includes(kind) || positionals.length > 1) {
      throw usageError('export', `takes one of ${KINDS.join(', ')}`);
    }
    const format = values.format ?? 'csv';
    if (!FORMATS[kind].includes(format)) throw new StemwiseError('usage', `export ${kind}: --format must be one of ${FORMATS[kind].join(', ')}, not '${format}'`);
    if (kind !== 'fits' && (values.axis !== undefined || values.metric !== undefined)) {
      throw new StemwiseError('usage', `export ${kind}: --axis and --metric apply to export fits only`);
    }
    if (kind === 'fits' && values.region !== undefined) {
      throw new StemwiseError('usage', 'export fits: --region does not apply (fits are per forest type; region × forest type fits are in the report)');
    }
    if (values.out === '') throw new StemwiseError('usage', 'export: --out needs a file name');
    const target: ExportTarget = values.out ? { file: values.out } : { stream: process.stdout };

    const compute = await import('@stemwise/compute');
    let written: { rows: number; staleVisits?: number };
    if (kind === 'fits') {
      // Names are checked before the database is opened: a typo is a usage error at once.
      if (values.axis !== undefined) checkFitColumn('axis', values.axis);
      if (values.metric !== undefined) checkFitColumn('metric', values.metric);
      const db = await rt.db();
      written = await compute.exportFits({ db, config: rt.config, log: rt.log }, { format: format as 'csv' | 'json', axis: values.axis, metric: values.metric }, target);
    } else if (kind === 'plots' || kind === 'change') {
      const db = await rt.db();
      const write = kind === 'plots' ? compute.exportPlots : compute.exportChange;
      written = await write(db, { format: format as 'csv' | 'json' | 'geojson', region: values.region ?? null }, target);
    } else {
      const { exportRegions } = await import('@stemwise/report');
      written = await exportRegions({ db: await rt.db() }, { format: format as 'csv' | 'json', region: values.region ?? null }, target);
    }
    if (values.out) printErr(`stemwise: ${written.rows} row${written.rows === 1 ? '' : 's'} written to ${values.out}\n`);
    if (kind === 'change' && written.rows === 0) {
      printErr("stemwise: note: no plot has two computed visits yet; change rows appear once a plot is measured again (same plot_id, a later date)\n");
    }
    if (written.staleVisits) {
      printErr(`stemwise: note: ${written.staleVisits} plot visit${written.staleVisits === 1 ? ' awaits' : 's await'} recompute; their figures are missing or out of date (run 'stemwise recompute')\n`);
    }
    return 0;
  },
});
