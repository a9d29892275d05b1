import fs from 'node:fs';
import path from 'node:path';
import { getBatch } from '@stemwise/db';
import { batchReport, filesInDir, SubmissionError, submitBatch, type ServiceDeps, type SubmittedFile } from '@stemwise/core';
import { StemwiseError, type ProcessorMap, type QueueName } from '@stemwise/platform';
import { formatBatchReport, ingestEvents, progressBars, progressLine, type IngestProgress } from '@stemwise/ingest';
import { processorsFor, SERVICE_NAMES, type ServiceName } from '../processors';
import { delimiterOption } from '../delimiter-option';
import { defineCommand, type Parsed } from '../command';
import { printErr, printOut } from '../output';
import type { Runtime } from '../runtime';

/** How long `--wait` lets a batch sit before it checks that a worker serves its queue. */
const WORKER_CHECK_MS = 5_000;

const USAGE = `usage: stemwise upload DIR [options]
       stemwise upload --plots FILE --trees FILE [--strata FILE] [--species FILE] [options]

DIR holds plots.csv and trees.csv, optionally strata.csv and species.csv (each may be .csv.gz).
Prints the batch id once the upload is stored.

options:
  --skip-invalid     load the valid rows and record the rest (default: any error rejects the batch)
  --replace          replace a visit already stored for the same plot and survey_date (audited)
  --delimiter ';'    values are separated by semicolons
  --decimal-comma    numbers are written with a decimal comma (needs --delimiter ';')
  --wait             wait until the batch is loaded and computed; exit 1 if it is rejected or fails
                     (with Redis, says so when no worker serves the queue the batch waits in)

Progress is shown as bars on a terminal, as a line every few seconds otherwise; logs show warnings
and errors only, as text (STEMWISE_LOG_FORMAT=json for JSON lines).
`;

const options = {
  plots: { type: 'string' },
  trees: { type: 'string' },
  strata: { type: 'string' },
  species: { type: 'string' },
  'skip-invalid': { type: 'boolean', default: false },
  replace: { type: 'boolean', default: false },
  delimiter: { type: 'string' },
  'decimal-comma': { type: 'boolean', default: false },
  wait: { type: 'boolean', default: false },
} as const;

export const command = defineCommand({
  usage: USAGE,
  options,
  positionals: true,
  run: upload,
});

function fileArg(value: string | undefined, kind: SubmittedFile['kind']): SubmittedFile | null {
  if (value === undefined) return null;
  if (!fs.existsSync(value) || !fs.statSync(value).isFile()) throw new StemwiseError('usage', `--${kind}: ${value} is not a file`);
  return { kind, name: path.basename(value), source: value };
}

/** Shows progress: bars redrawn in place on a terminal, a plain line every few seconds otherwise. */
function progressPrinter(): { show(p: Omit<IngestProgress, 'batchId' | 'phase'>): void; end(): void } {
  const tty = process.stderr.isTTY === true;
  let drawn = 0;
  let lastPlain = 0;
  return {
    show(p) {
      if (tty) {
        const lines = progressBars(p);
        // Written directly: the bars hold numbers only, and these cursor movements are ours.
        process.stderr.write(`${drawn ? `\x1b[${drawn}A` : ''}${lines.map((l) => `\x1b[2K${l}`).join('\n')}\n`);
        drawn = lines.length;
      } else if (Date.now() - lastPlain >= 2000) {
        lastPlain = Date.now();
        printErr(`${progressLine(p)}\n`);
      }
    },
    end() {
      drawn = 0;
    },
  };
}

async function upload({ values, positionals }: Parsed<typeof options>, rt: Runtime): Promise<number> {
  let files: SubmittedFile[];
  if (positionals.length) {
    if (positionals.length > 1 || values.plots || values.trees) throw new StemwiseError('usage', 'give either one folder or --plots and --trees');
    const dir = positionals[0];
    if (!fs.existsSync(dir) || !fs.statSync(dir).isDirectory()) throw new StemwiseError('usage', `${dir} is not a folder`);
    try {
      files = filesInDir(dir);
    } catch (err) {
      throw new StemwiseError('usage', (err as Error).message);
    }
    for (const need of ['plots', 'trees']) if (!files.some((f) => f.kind === need)) throw new StemwiseError('usage', `${dir} has no ${need}.csv (or ${need}.csv.gz)`);
  } else {
    if (!values.plots || !values.trees) throw new StemwiseError('usage', `give an upload folder, or --plots FILE and --trees FILE`);
    files = (['plots', 'trees', 'strata', 'species'] as const).map((k) => fileArg(values[k], k)).filter((f): f is SubmittedFile => f !== null);
  }
  const delimiter = delimiterOption(values.delimiter);

  const deps: ServiceDeps = { config: rt.config, db: await rt.db(), log: rt.log, queue: await rt.queue() };
  const inProcess = deps.queue.kind === 'in-process';
  // Without Redis nothing outlives this process: the ingest job runs here, and with --wait the compute and report jobs too.
  if (inProcess) {
    const { processors, ...work } = await processorsFor(deps, values.wait ? SERVICE_NAMES : ['ingest']);
    await deps.queue.work(processors, work);
  }

  let result;
  try {
    result = await submitBatch(
      deps,
      files,
      { skipInvalid: values['skip-invalid'], replace: values.replace, delimiter, decimalComma: values['decimal-comma'] },
      'cli',
    );
  } catch (err) {
    if (err instanceof SubmissionError) throw new StemwiseError('usage', err.message);
    throw err;
  }
  printOut(result.duplicate ? `already received as ${result.batchId}\n` : `${result.batchId}\n`);
  if (!result.duplicate && !result.queued) printErr('stemwise: the batch is stored but could not be queued now; a running worker will pick it up\n');

  const printer = progressPrinter();
  if (inProcess) {
    const onProgress = (p: IngestProgress) => p.batchId === result.batchId && printer.show(p);
    ingestEvents.on('progress', onProgress);
    try {
      await deps.queue.drain(24 * 3600_000);
    } finally {
      ingestEvents.off('progress', onProgress);
    }
  } else if (values.wait) {
    const hinted = new Set<QueueName>();
    let lastCheck = Date.now();
    for (;;) {
      const b = await getBatch(deps.db, result.batchId);
      if (!b) throw new StemwiseError('batch_missing', `batch ${result.batchId} disappeared`);
      if (['computed', 'rejected', 'failed'].includes(b.state)) break;
      printer.show({ bytesTotal: Number(b.bytesTotal), bytesRead: Number(b.bytesRead), rowsChecked: b.rowsChecked, rowsLoaded: b.rowsLoaded });
      // Waiting on a queue nobody serves would look like a hang: say so once (the batch stays queued).
      if (Date.now() - lastCheck >= WORKER_CHECK_MS) {
        lastCheck = Date.now();
        const queue: QueueName = b.state === 'loaded' ? 'compute' : 'ingest';
        if (!hinted.has(queue) && (await deps.queue.workerCount(queue)) === 0) {
          hinted.add(queue);
          printer.end();
          printErr(
            `stemwise: no ${queue} worker is running, so the batch is ${b.state === 'loaded' ? 'loaded but not computed' : 'not being read'} yet; ` +
              `start one with 'stemwise serve ${queue}' (still waiting; Ctrl-C stops waiting, the batch stays queued)\n`,
          );
        }
      }
      await new Promise((r) => setTimeout(r, 500));
    }
  } else {
    return 0;
  }
  printer.end();
  const report = await batchReport(deps.db, result.batchId);
  if (!report) throw new StemwiseError('batch_missing', `batch ${result.batchId} disappeared`);
  if (report.state === 'rejected' || report.state === 'failed') {
    printErr(formatBatchReport(report));
    return 1;
  }
  printErr(
    `batch ${report.id}: ${report.state}; ${report.counts.plotsLoaded.toLocaleString('en-US')} plots and ${report.counts.stemsLoaded.toLocaleString('en-US')} stems loaded; ` +
      `${report.counts.warnings.toLocaleString('en-US')} warnings${report.counts.warnings ? ` (stemwise batch show ${report.id})` : ''}\n`,
  );
  return 0;
}
