import fs from 'node:fs';
import { parseArgs } from 'node:util';
import { StemwiseError } from '@stemwise/platform';
import { formatBatchReport } from '@stemwise/ingest';
import { batchIssuesCsv, batchReport } from '@stemwise/core';
import type { Runtime } from '../runtime';

export const summary = 'shows a batch: batch show ID [--format text|json] [--errors-csv FILE]';

const HELP = `usage: stemwise batch show ID [--format text|json] [--errors-csv FILE] [--all-issues]

Shows the state, counts, progress and the errors and warnings of a batch, grouped by rule.
  --format json       the report as JSON (the same document as GET /v1/batches/ID)
  --errors-csv FILE   also writes the stored errors (with --all-issues: and warnings) as CSV
`;

export async function run(args: string[], rt: Runtime): Promise<number> {
  const { values, positionals } = parseArgs({
    args,
    allowPositionals: true,
    options: {
      format: { type: 'string', default: 'text' },
      'errors-csv': { type: 'string' },
      'all-issues': { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const [sub, id, ...rest] = positionals;
  if (sub !== 'show' || !id || rest.length) throw new StemwiseError('usage', `expected: batch show ID\n${HELP}`);
  if (values.format !== 'text' && values.format !== 'json') throw new StemwiseError('usage', `--format takes text or json, not ${values.format}`);
  const db = await rt.db();
  const report = await batchReport(db, id, values.format === 'json' ? 20 : 5);
  if (!report) throw new StemwiseError('not_found', `there is no batch ${id}`);
  process.stdout.write(values.format === 'json' ? `${JSON.stringify(report, null, 2)}\n` : formatBatchReport(report));
  if (values['errors-csv']) {
    const csv = await batchIssuesCsv(db, id, values['all-issues'] ? 'all' : 'error');
    fs.writeFileSync(values['errors-csv'], csv ?? '');
  }
  return 0;
}
