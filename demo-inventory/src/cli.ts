// Command line of the demo inventory generator:
//   tsx demo-inventory/src/cli.ts --plots 20000 --seed 7 --out DIR [--gzip] [--bad-rows 50] [--heights 0.2] [--expectation 600]
// A progress bar on a terminal, plain progress lines otherwise (logs, CI).

import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import { GENERATE_DEFAULTS, generateInventory, MAX_PLOTS, type GenerateProgress } from './generate';

/** Where the command writes: stdout for the result, stderr for progress and errors. */
export interface CliIo {
  readonly stdout: { write(text: string): unknown };
  readonly stderr: { write(text: string): unknown; readonly isTTY?: boolean };
}

const USAGE = `usage: demo-inventory --out DIR [options]

Writes an invented national forest inventory (plots, trees, strata, species and truth.json), and
the second visit of most plots, 4-6 years later, as a batch of its own in the folder second-visit.

options:
  --out DIR          output folder (required; created when missing)
  --plots N          number of plots, 1..${MAX_PLOTS} (default ${GENERATE_DEFAULTS.plots})
  --seed N           integer seed; the same seed gives the same files (default ${GENERATE_DEFAULTS.seed})
  --gzip             write .csv.gz instead of .csv
  --heights F        share of plots with measured heights, 0..1 (default ${GENERATE_DEFAULTS.heightsFraction})
  --bad-rows N       add N deliberately bad rows for ingest tests (default ${GENERATE_DEFAULTS.badRows})
  --expectation N    also simulate N independent plots per forest type (another seed) for the expected
                     change under the planted process, written to truth.json (default ${GENERATE_DEFAULTS.expectationPlots}: none)
  -h, --help         show this help
`;

class UsageError extends Error {}

/** Runs the command; returns the exit code (0 done, 1 failed, 2 bad usage). */
export async function main(argv: readonly string[] = process.argv.slice(2), io: CliIo = process): Promise<number> {
  let args;
  try {
    args = parseCli(argv);
  } catch (err) {
    io.stderr.write(`demo-inventory: ${err instanceof Error ? err.message : String(err)}\n\n${USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(USAGE);
    return 0;
  }
  const progress = progressReporter(io.stderr);
  const started = Date.now();
  try {
    const result = await generateInventory({ ...args, onProgress: progress.update });
    progress.finish();
    const c = result.truth.counts;
    io.stdout.write(
      [
        `wrote ${c.plots} plots and ${c.stems.rows} stems in ${((Date.now() - started) / 1000).toFixed(1)} s` +
          (c.bad_rows > 0 ? `, with ${c.bad_rows} deliberately bad rows (listed in truth.json)` : ''),
        ...Object.values(result.files).map((f) => `  ${f}`),
      ].join('\n') + '\n',
    );
    return 0;
  } catch (err) {
    progress.finish();
    io.stderr.write(`demo-inventory: ${err instanceof Error ? err.message : String(err)}\n`);
    return 1;
  }
}

interface CliArgs {
  outDir: string;
  plots: number;
  seed: number;
  gzip: boolean;
  heightsFraction: number;
  badRows: number;
  expectationPlots: number;
}

function parseCli(argv: readonly string[]): CliArgs | 'help' {
  const { values, positionals } = parseArgs({
    args: [...argv],
    allowPositionals: true,
    strict: true,
    options: {
      out: { type: 'string' },
      plots: { type: 'string' },
      seed: { type: 'string' },
      gzip: { type: 'boolean', default: false },
      heights: { type: 'string' },
      'bad-rows': { type: 'string' },
      expectation: { type: 'string' },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) return 'help';
  if (positionals.length > 0) throw new UsageError(`unexpected argument '${positionals[0]}'`);
  if (values.out === undefined || values.out === '') throw new UsageError('--out DIR is required');
  return {
    outDir: values.out,
    plots: integerOption('--plots', values.plots, GENERATE_DEFAULTS.plots, 1, MAX_PLOTS),
    seed: integerOption('--seed', values.seed, GENERATE_DEFAULTS.seed, -(2 ** 31), 2 ** 32 - 1),
    gzip: values.gzip === true,
    heightsFraction: numberOption('--heights', values.heights, GENERATE_DEFAULTS.heightsFraction, 0, 1),
    badRows: integerOption('--bad-rows', values['bad-rows'], GENERATE_DEFAULTS.badRows, 0, 1_000_000),
    expectationPlots: integerOption('--expectation', values.expectation, GENERATE_DEFAULTS.expectationPlots, 0, 100_000),
  };
}

function numberOption(name: string, text: string | undefined, fallback: number, min: number, max: number): number {
  if (text === undefined) return fallback;
  const x = Number(text);
  if (text.trim() === '' || !Number.isFinite(x) || x < min || x > max) {
    throw new UsageError(`${name} must be a number from ${min} to ${max}, got '${text}'`);
  }
  return x;
}

function integerOption(name: string, text: string | undefined, fallback: number, min: number, max: number): number {
  const x = numberOption(name, text, fallback, min, max);
  if (!Number.isInteger(x)) throw new UsageError(`${name} must be a whole number, got '${text}'`);
  return x;
}

// A redrawn bar on a terminal; on anything else one line per tenth, so logs stay readable.
function progressReporter(stream: CliIo['stderr']): { update: (p: GenerateProgress) => void; finish: () => void } {
  const tty = stream.isTTY === true;
  const started = Date.now();
  let lastTenth = -1;
  let drawn = false;
  return {
    update(p) {
      const share = p.plotsDone / p.plotsTotal;
      const seconds = ((Date.now() - started) / 1000).toFixed(0);
      const counts = `${p.plotsDone}/${p.plotsTotal} plots, ${p.stemsWritten.toLocaleString('en-US')} stems, ${seconds} s`;
      if (tty) {
        const width = 30;
        const filled = Math.round(share * width);
        stream.write(`\r[${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${(share * 100).toFixed(0).padStart(3)}% ${counts}`);
        drawn = true;
        return;
      }
      const tenth = Math.floor(share * 10);
      if (tenth > lastTenth) {
        lastTenth = tenth;
        stream.write(`${(tenth * 10).toString().padStart(3)}% ${counts}\n`);
      }
    },
    finish() {
      if (drawn) stream.write('\n');
      drawn = false;
    },
  };
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().then(
    (code) => {
      process.exitCode = code;
    },
    (err: unknown) => {
      process.stderr.write(`demo-inventory: ${String(err)}\n`);
      process.exitCode = 1;
    },
  );
}
