import fs from 'node:fs';
import { batchIssuesCsv, batchReport } from '@stemwise/core';
import { formatBatchReport } from '@stemwise/ingest';
import { StemwiseError } from '@stemwise/platform';
import { defineCommand, usageError, type CommandGroup } from '../command';
import { printOut } from '../output';

const show = defineCommand({
  summary: 'shows the state, counts, progress, errors and warnings of a batch',
  usage: `usage: stemwise batch show ID [--format text|json] [--errors-csv FILE] [--all-issues]

Shows the state, counts, progress and the errors and warnings of a batch, grouped by rule.
  --format json       the report as JSON (the same document as GET /v1/batches/ID)
  --errors-csv FILE   also writes the stored errors (with --all-issues: and warnings) as CSV
`,
  options: {
    format: { type: 'string', default: 'text' },
    'errors-csv': { type: 'string' },
    'all-issues': { type: 'boolean', default: false },
  },
  positionals: true,
  async run({ values, positionals }, rt) {
    const [id, ...rest] = positionals;
    if (!id || rest.length) throw usageError('batch show', 'takes one batch id');
    if (values.format !== 'text' && values.format !== 'json') throw new StemwiseError('usage', `--format takes text or json, not ${values.format}`);
    const db = await rt.db();
    const report = await batchReport(db, id, values.format === 'json' ? 20 : 5);
    if (!report) throw new StemwiseError('not_found', `there is no batch ${id}`);
    printOut(values.format === 'json' ? `${JSON.stringify(report, null, 2)}\n` : formatBatchReport(report));
    if (values['errors-csv']) {
      const csv = await batchIssuesCsv(db, id, values['all-issues'] ? 'all' : 'error');
      fs.writeFileSync(values['errors-csv'], csv ?? '');
    }
    return 0;
  },
});

export const command: CommandGroup = {
  usage: `usage: stemwise batch show ID [--format text|json] [--errors-csv FILE] [--all-issues]

  show    ${show.summary}
`,
  subcommands: { show },
};
