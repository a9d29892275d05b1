// Writes a demo inventory batch (plots, trees, strata, species) plus truth.json, plot by plot as
// streams: memory stays flat whether the run has 10 plots or 20,000 (several million stems).

import { mkdir, writeFile } from 'node:fs/promises';
import { join, relative, sep } from 'node:path';
import { badPlotLine, badTreeLine, isPlotKind, planBadRows, type BadRowRecord } from './bad-rows';
import { PLOT_COLUMNS, plotLine, strataLines, TREE_COLUMNS, treeLine } from './csv-lines';
import { generatePlot, type GeneratedPlot } from './plot-generator';
import { rngFor } from './random';
import { secondVisit } from './second-visit';
import { expectedChange } from './change-expectation';
import { buildFlora, speciesCsvLines } from './species';
import { TextSink } from './text-sink';
import { buildTruth, TruthTally, type Truth } from './truth';

export interface GenerateOptions {
  /** Output folder; created when missing. Existing files of the same names are replaced. */
  readonly outDir: string;
  /** Seed of the inventory (integer, default 1): the same seed gives the same files. */
  readonly seed?: number;
  /** Number of plots, 1 to 100,000 (default 450). */
  readonly plots?: number;
  /** Write `.csv.gz` files instead of `.csv` (default false). */
  readonly gzip?: boolean;
  /** Share of plots whose live stems have measured heights, 0 to 1 (default 0.2). */
  readonly heightsFraction?: number;
  /** Number of deliberately bad rows mixed in for ingest tests (default 0). */
  readonly badRows?: number;
  /**
   * Plots per forest type of the independent simulation that gives the expected change under the
   * planted process (truth.json `change.expected`); 0 (the default) leaves it out. It takes a few seconds per 100.
   */
  readonly expectationPlots?: number;
  /** Called every ~0.5 % of the plots and once at the end. */
  readonly onProgress?: (progress: GenerateProgress) => void;
}

export interface GenerateProgress {
  readonly plotsDone: number;
  readonly plotsTotal: number;
  readonly stemsWritten: number;
}

export interface InventoryFiles {
  readonly plots: string;
  readonly trees: string;
  readonly strata: string;
  readonly species: string;
  readonly truth: string;
  /** The second visits of the re-measured plots: a batch of its own, uploaded after the first. */
  readonly secondVisitPlots: string;
  readonly secondVisitTrees: string;
}

export interface GenerateResult {
  readonly files: InventoryFiles;
  readonly truth: Truth;
}

export const GENERATE_DEFAULTS = { seed: 1, plots: 450, gzip: false, heightsFraction: 0.2, badRows: 0, expectationPlots: 0 } as const;
/** The folder, inside the output folder, of the second-visit batch. */
export const SECOND_VISIT_DIR = 'second-visit';
/** The simulation of the expected change uses the inventory's seed plus this, so it is independent of the inventory. */
export const EXPECTATION_SEED_OFFSET = 1_000_003;
export const MAX_PLOTS = 100_000;

/** Generates the demo inventory into `options.outDir`. */
export async function generateInventory(options: GenerateOptions): Promise<GenerateResult> {
  const o = checkOptions(options);
  await mkdir(join(o.outDir, SECOND_VISIT_DIR), { recursive: true });
  const ext = o.gzip ? '.csv.gz' : '.csv';
  const files: InventoryFiles = {
    plots: join(o.outDir, `plots${ext}`),
    trees: join(o.outDir, `trees${ext}`),
    strata: join(o.outDir, `strata${ext}`),
    species: join(o.outDir, `species${ext}`),
    truth: join(o.outDir, 'truth.json'),
    secondVisitPlots: join(o.outDir, SECOND_VISIT_DIR, `plots${ext}`),
    secondVisitTrees: join(o.outDir, SECOND_VISIT_DIR, `trees${ext}`),
  };
  const flora = buildFlora();
  const sinks = {
    plots: new TextSink(files.plots, o.gzip),
    trees: new TextSink(files.trees, o.gzip),
    strata: new TextSink(files.strata, o.gzip),
    species: new TextSink(files.species, o.gzip),
    secondVisitPlots: new TextSink(files.secondVisitPlots, o.gzip),
    secondVisitTrees: new TextSink(files.secondVisitTrees, o.gzip),
  };
  const tally = new TruthTally(flora);
  const badRows: BadRowRecord[] = [];
  try {
    await sinks.species.lines(speciesCsvLines(flora));
    await sinks.strata.lines(strataLines());
    await sinks.plots.line(PLOT_COLUMNS.join(','));
    await sinks.trees.line(TREE_COLUMNS.join(','));
    await sinks.secondVisitPlots.line(PLOT_COLUMNS.join(','));
    await sinks.secondVisitTrees.line(TREE_COLUMNS.join(','));
    const lineNo = { plots: 1, trees: 1 };
    const badRng = rngFor(o.seed, 'bad-rows');
    const plan = planBadRows(o.badRows, o.plots, badRng);
    const context = { seed: o.seed, flora, heightsFraction: o.heightsFraction };
    const progressEvery = Math.max(1, Math.floor(o.plots / 200));
    let carried: string[] = [];
    let stemsWritten = 0;

    for (let i = 0; i < o.plots; i++) {
      const plot = generatePlot(context, i);
      const later = secondVisit(o.seed, flora, plot, i);
      tally.add(plot, later);
      if (later !== null) {
        await sinks.secondVisitPlots.line(plotLine(later.row));
        await sinks.secondVisitTrees.lines(later.stems.map((s) => treeLine(later.row.plotId, s)));
        stemsWritten += later.stems.length;
      }
      const kinds = [...carried, ...(plan.get(i) ?? [])];
      const plotKinds = kinds.filter(isPlotKind);
      const treeKinds = kinds.filter((k) => !isPlotKind(k));
      const usable = treeKinds.filter((k) => canPlace(k, plot));
      carried = treeKinds.filter((k) => !canPlace(k, plot));

      const plotTexts = [plotLine(plot.row)];
      lineNo.plots += 1;
      for (const kind of plotKinds) {
        const bad = badPlotLine(kind, plot.row, badRows.length + 1, badRng);
        plotTexts.push(bad.text);
        lineNo.plots += 1;
        badRows.push({ file: 'plots.csv', line: lineNo.plots, kind, rule: bad.rule, plot_id: bad.plotId });
      }
      await sinks.plots.lines(plotTexts);

      // Bad tree rows go at random places inside the plot's block of stems.
      const slots = usable.map(() => badRng.int(plot.stems.length + 1)).sort((a, b) => a - b);
      const treeTexts: string[] = [];
      let next = 0;
      for (let s = 0; s <= plot.stems.length; s++) {
        while (next < usable.length && slots[next] === s) {
          const bad = badTreeLine(usable[next], plot.row, plot.stems, badRows.length + 1, badRng);
          treeTexts.push(bad.text);
          lineNo.trees += 1;
          badRows.push({ file: 'trees.csv', line: lineNo.trees, kind: usable[next], rule: bad.rule, plot_id: bad.plotId, tree_id: bad.treeId });
          next += 1;
        }
        if (s < plot.stems.length) {
          treeTexts.push(treeLine(plot.row.plotId, plot.stems[s]));
          lineNo.trees += 1;
        }
      }
      await sinks.trees.lines(treeTexts);
      stemsWritten += plot.stems.length;
      if (o.onProgress !== undefined && ((i + 1) % progressEvery === 0 || i + 1 === o.plots)) {
        o.onProgress({ plotsDone: i + 1, plotsTotal: o.plots, stemsWritten });
      }
    }
    await Promise.all(Object.values(sinks).map((s) => s.close()));
  } catch (err) {
    await Promise.all(Object.values(sinks).map((s) => s.discard()));
    throw err;
  }

  const truth = buildTruth(tally, {
    seed: o.seed,
    plots: o.plots,
    gzip: o.gzip,
    heightsFraction: o.heightsFraction,
    badRowsRequested: o.badRows,
    badRows,
    files: Object.fromEntries(Object.entries(files).map(([k, v]) => [k, relative(o.outDir, v).split(sep).join('/')])),
    expected: o.expectationPlots > 0 ? { seed: o.seed + EXPECTATION_SEED_OFFSET, byType: expectedChange({ plotsPerType: o.expectationPlots, seed: o.seed + EXPECTATION_SEED_OFFSET }, flora) } : null,
  });
  await writeFile(files.truth, JSON.stringify(truth, null, 2) + '\n');
  return { files, truth };
}

// A subplot kind needs a plot with a subplot; every tree kind needs a stem to copy.
function canPlace(kind: string, plot: GeneratedPlot): boolean {
  if (plot.stems.length === 0) return false;
  return kind !== 'subplot_stem_too_large' || plot.row.subplotAreaHa > 0;
}

type CheckedOptions = Required<Omit<GenerateOptions, 'onProgress'>> & Pick<GenerateOptions, 'onProgress'>;

function checkOptions(options: GenerateOptions): CheckedOptions {
  const o = { ...GENERATE_DEFAULTS, ...stripUndefined(options) } as CheckedOptions;
  if (typeof o.outDir !== 'string' || o.outDir.length === 0) throw new RangeError('generateInventory: outDir is required');
  if (!Number.isSafeInteger(o.seed)) throw new RangeError(`generateInventory: seed must be an integer, got ${o.seed}`);
  if (!(Number.isInteger(o.plots) && o.plots >= 1 && o.plots <= MAX_PLOTS)) {
    throw new RangeError(`generateInventory: plots must be an integer from 1 to ${MAX_PLOTS}, got ${o.plots}`);
  }
  if (!(o.heightsFraction >= 0 && o.heightsFraction <= 1)) {
    throw new RangeError(`generateInventory: heightsFraction must be from 0 to 1, got ${o.heightsFraction}`);
  }
  if (!(Number.isInteger(o.expectationPlots) && o.expectationPlots >= 0 && o.expectationPlots <= 100_000)) {
    throw new RangeError(`generateInventory: expectationPlots must be an integer from 0 to 100000, got ${o.expectationPlots}`);
  }
  if (!(Number.isInteger(o.badRows) && o.badRows >= 0 && o.badRows <= 10 * o.plots)) {
    throw new RangeError(`generateInventory: badRows must be an integer from 0 to 10 × plots, got ${o.badRows}`);
  }
  return o;
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}
