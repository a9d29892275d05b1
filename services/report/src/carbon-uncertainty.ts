import { listHeightModels, listRegionCarbonMoments, listRegionChangeCarbonMoments, type Queryable } from '@stemwise/db';
import {
  CARBON_ERROR_SOURCES,
  carbonUncertainty,
  hasCarbonSums,
  heightModelFromRow,
  IPCC_2006_CARBON_FRACTION,
  WHOLE_REGION,
  type CarbonErrorSource,
  type CarbonMoments,
  type CarbonPool,
  type CarbonStratum,
  type CarbonUncertainty,
  type HeightModelError,
  type RegionRow,
} from '@stemwise/core';
import type { Config } from '@stemwise/platform';
import { resolveForestAreas } from './summary/forest-areas';

// The whole uncertainty of carbon in the region and national summaries (docs/methods.md#carbon-uncertainty):
// four sections, each of one summary variable — the above-ground carbon stock (carbon_mg_ha), the tree
// pool (tree_carbon_mg_ha: above- and below-ground live biomass and standing dead wood), the net
// above-ground carbon change between visits (carbon_net_change_mg_ha_yr) and the tree pool's net change
// (tree_carbon_net_change_mg_ha_yr). Each reads the sums the
// metrics (or change) stage stored per plot, the forest types' height models, and runs the Monte Carlo of
// core's carbonUncertainty. Kept apart from the summaries' own estimators: the summaries call these
// functions once per section and store what they return.

/** The variable of the above-ground stock section (the first section, kept under its old name). */
export const CARBON_VARIABLE = 'carbon_mg_ha';

/** The sections: the summary variable each gives the whole interval to, and what its figure is. */
export const CARBON_SECTIONS = {
  stock: { variable: 'carbon_mg_ha', pool: 'above-ground', corePool: 'aboveGround' },
  trees: { variable: 'tree_carbon_mg_ha', pool: 'trees', corePool: 'trees' },
  change: { variable: 'carbon_net_change_mg_ha_yr', pool: 'above-ground change', corePool: 'aboveGround' },
  treeChange: { variable: 'tree_carbon_net_change_mg_ha_yr', pool: 'tree change', corePool: 'treesChange' },
} as const satisfies Record<string, { variable: string; pool: string; corePool: CarbonPool }>;
export type CarbonSectionKind = keyof typeof CARBON_SECTIONS;
type SectionSpec = (typeof CARBON_SECTIONS)[CarbonSectionKind];

/** One scope (the whole region or nation, or one forest type) of the section. */
export interface CarbonUncertaintyRow {
  readonly forest_type: string;
  readonly n_plots: number;
  /** Mg C/ha (change: Mg C/ha/yr). */
  readonly mean: number;
  readonly sampling_se: number;
  readonly sampling_ci_low: number;
  readonly sampling_ci_high: number;
  readonly whole_se: number;
  readonly whole_ci_low: number;
  readonly whole_ci_high: number;
  readonly forest_area_ha: number | null;
  /** Mg C (change: Mg C/yr) over the forest area; null without every stratum's area. */
  readonly total: number | null;
  readonly total_sampling_ci_low: number | null;
  readonly total_sampling_ci_high: number | null;
  readonly total_whole_ci_low: number | null;
  readonly total_whole_ci_high: number | null;
  /** Share of each source's variance in the sum of the sources' variances. */
  readonly shares: Readonly<Record<CarbonErrorSource, number>>;
}

export interface CarbonUncertaintySection {
  readonly variable: SectionSpec['variable'];
  readonly pool: SectionSpec['pool'];
  readonly rows: readonly CarbonUncertaintyRow[];
  readonly draws: number;
  readonly seed: number;
  readonly confidence: number;
  readonly tree_error_scope: 'forest' | 'plots' | null;
  /** Why there is no section, when there is none (e.g. plots computed before the sums were kept). */
  readonly missing: string | null;
  /** What the whole interval covers and what it does not. */
  readonly covers: readonly string[];
  readonly not_covered: readonly string[];
}

export const CARBON_COVERS: readonly string[] = [
  'sampling error (the stratified estimate, as in the sampling interval)',
  "the biomass model's residual error, tree by tree (Chave et al. 2014 eq. 4 residual standard error on the log scale)",
  "the local height–diameter model's residual error (tree by tree) and its parameter uncertainty (shared by every tree of a forest type)",
  "each tree's wood density around its reference value",
];

const NOT_COVERED_COMMON: readonly string[] = [
  'field measurement error (diameters, heights, species names)',
  "the error of the forest-area map: forest areas are taken as exact",
  "the biomass model's own parameter uncertainty and any bias of a pantropical model at this site",
  'errors shared by the reference wood densities of a species',
  'the carbon fraction (0.47 taken as exact)',
];

export const CARBON_NOT_COVERED: readonly string[] = [
  ...NOT_COVERED_COMMON,
  'the other carbon pools: this interval is of above-ground live trees only (the tree-pool section adds below-ground biomass and standing dead wood; lying dead wood, litter and soil are not estimated)',
];

const COVERS: Readonly<Record<CarbonSectionKind, readonly string[]>> = {
  stock: CARBON_COVERS,
  trees: [
    ...CARBON_COVERS,
    "the root-to-shoot ratio: each plot's own ratio (its forest type's relation at its biomass), with the error of the table row or equation it came from shared by every plot that uses it",
    'the same per-tree and height-model errors for the standing dead stems',
  ],
  change: [
    ...CARBON_COVERS,
    "for a tree measured at both visits, its model errors are taken as the same at both (the tree's error cancels in part in its growth)",
  ],
  treeChange: [
    ...CARBON_COVERS,
    "for a tree measured at both visits, its model errors are taken as the same at both (the tree's error cancels in part in its growth)",
    "the root-to-shoot ratio: each visit's own ratio, with the error of its table row or equation shared by every plot and visit that uses it (a plot whose two visits read the same row has the same error at both)",
    'the same per-tree and height-model errors for the standing dead stems',
  ],
};

const NOT_COVERED_CHANGE = 'changes of the models between the visits (the same models are applied to both visits)';

const NOT_COVERED: Readonly<Record<CarbonSectionKind, readonly string[]>> = {
  stock: CARBON_NOT_COVERED,
  trees: [
    ...NOT_COVERED_COMMON,
    'the share of its biomass a standing dead stem keeps (taken as exact) and the error of the ratio beyond the range its table row gives',
    'lying dead wood, litter and soil (not estimated)',
  ],
  change: [
    ...NOT_COVERED_COMMON,
    NOT_COVERED_CHANGE,
    'below-ground biomass, dead wood, litter and soil: this interval is of the above-ground live-tree carbon change only',
  ],
  treeChange: [
    ...NOT_COVERED_COMMON,
    NOT_COVERED_CHANGE,
    'the share of its biomass a standing dead stem keeps (taken as exact) and the error of the ratio beyond the range its table row gives',
    'lying dead wood, litter and soil (not estimated)',
  ],
};

interface PlotSums {
  readonly scope: string;
  readonly forestType: string;
  readonly moments: CarbonMoments;
}

type SectionSums = { plots: PlotSums[]; without: number };

/**
 * A region's plots (latest visit; for change, the pair ending at it) with each section's sums, or the
 * number that have none: two reads (stock and change) for the four sections.
 */
export async function readRegionCarbonSums(db: Queryable, region: string): Promise<Record<CarbonSectionKind, SectionSums>> {
  const [stock, change] = await Promise.all([listRegionCarbonMoments(db, region), listRegionChangeCarbonMoments(db, region)]);
  const collect = (kind: CarbonSectionKind, rows: ReadonlyArray<{ forestType: string; moments: unknown }>): SectionSums => {
    const pool = CARBON_SECTIONS[kind].corePool;
    const out: SectionSums = { plots: [], without: 0 };
    for (const r of rows) {
      if (hasCarbonSums(r.moments, pool)) out.plots.push({ scope: region, forestType: r.forestType, moments: r.moments });
      else out.without += 1;
    }
    return out;
  };
  const treesOf = (m: unknown): unknown => (typeof m === 'object' && m !== null ? (m as { trees?: unknown }).trees : undefined);
  return {
    stock: collect('stock', stock),
    trees: collect('trees', stock),
    change: collect('change', change.filter((r) => r.hasChange)),
    treeChange: collect('treeChange', change.filter((r) => r.hasTreeChange).map((r) => ({ forestType: r.forestType, moments: treesOf(r.moments) }))),
  };
}

async function heightModelErrors(db: Queryable, forestTypes: readonly string[]): Promise<Map<string, HeightModelError>> {
  const out = new Map<string, HeightModelError>();
  for (const row of await listHeightModels(db, forestTypes)) {
    const m = heightModelFromRow(row);
    out.set(row.forestType, { rse: m.rse, covariance: m.covariance ?? null });
  }
  return out;
}

type Settings = Pick<Config, 'carbonDraws' | 'seed' | 'carbonAllometryRse' | 'carbonWoodDensitySd'>;

const unavailable = (config: Settings, kind: CarbonSectionKind, missing: string): CarbonUncertaintySection => ({
  variable: CARBON_SECTIONS[kind].variable,
  pool: CARBON_SECTIONS[kind].pool,
  rows: [],
  draws: config.carbonDraws,
  seed: config.seed,
  confidence: 0.95,
  tree_error_scope: null,
  missing,
  covers: COVERS[kind],
  not_covered: NOT_COVERED[kind],
});

const RECOMPUTE: Readonly<Record<CarbonSectionKind, string>> = {
  stock: 'were computed before the sums of the carbon uncertainty were kept',
  trees: "were computed before the sums of the tree pool's uncertainty (root-to-shoot ratio and dead wood) were kept",
  change: 'have a change between visits computed before the sums of its carbon uncertainty were kept',
  treeChange: "have a change between visits computed before the sums of the tree pool change's uncertainty were kept",
};

function row(forestType: string, r: CarbonUncertainty): CarbonUncertaintyRow {
  const a = r.area;
  return {
    forest_type: forestType,
    n_plots: r.n,
    mean: r.mean,
    sampling_se: r.samplingSe,
    sampling_ci_low: r.sampling.low,
    sampling_ci_high: r.sampling.high,
    whole_se: r.wholeSe,
    whole_ci_low: r.whole.low,
    whole_ci_high: r.whole.high,
    forest_area_ha: a,
    total: r.total,
    total_sampling_ci_low: a === null ? null : r.sampling.low * a,
    total_sampling_ci_high: a === null ? null : r.sampling.high * a,
    total_whole_ci_low: a === null ? null : r.whole.low * a,
    total_whole_ci_high: a === null ? null : r.whole.high * a,
    shares: r.shares,
  };
}

/**
 * The section of a set of strata (scope × forest type, each with its forest area): the whole estimate,
 * then each forest type alone (for a nation: its regions as strata). Null when the setting turns it off.
 */
export function carbonUncertaintySection(
  heightModels: ReadonlyMap<string, HeightModelError>,
  config: Settings,
  kind: CarbonSectionKind,
  plots: readonly PlotSums[],
  without: number,
  areaOf: (scope: string, forestType: string) => number | null,
): CarbonUncertaintySection | null {
  if (config.carbonDraws === 0) return null;
  if (without > 0) {
    return unavailable(config, kind, `${without} plot(s) ${RECOMPUTE[kind]}: run a full recompute (stemwise recompute --all) to get the whole interval.`);
  }
  if (plots.length === 0) return unavailable(config, kind, kind === 'change' || kind === 'treeChange' ? 'no plot measured twice' : 'no plots');
  const byStratum = new Map<string, { scope: string; forestType: string; moments: CarbonMoments[] }>();
  for (const p of plots) {
    const key = `${p.scope}\u0000${p.forestType}`;
    const s = byStratum.get(key);
    if (s) s.moments.push(p.moments);
    else byStratum.set(key, { scope: p.scope, forestType: p.forestType, moments: [p.moments] });
  }
  const strata: CarbonStratum[] = [...byStratum.values()]
    .map((s) => ({ name: `${s.scope} / ${s.forestType}`, forestType: s.forestType, size: areaOf(s.scope, s.forestType), plots: s.moments }))
    .sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  // The summaries' rule: forest areas weight the strata only when every stratum has one.
  const allAreas = strata.every((s) => s.size !== null);
  const usable = strata.map((s) => (allAreas ? s : { ...s, size: null }));
  const forestTypes = [...new Set(usable.map((s) => s.forestType))].sort();
  const settings = {
    draws: config.carbonDraws,
    seed: config.seed,
    carbonFraction: IPCC_2006_CARBON_FRACTION,
    allometryRse: config.carbonAllometryRse,
    woodDensityTreeSd: config.carbonWoodDensitySd,
    heightModels,
    pool: CARBON_SECTIONS[kind].corePool,
    stratified: { weighting: allAreas ? ('area' as const) : ('plot_count' as const) },
  };
  const whole = carbonUncertainty(usable, settings);
  if (whole === null) return unavailable(config, kind, 'a stratum has a single plot: no sampling variance, so no interval (as for the sampling interval)');
  const rows = [row(WHOLE_REGION, whole)];
  for (const t of forestTypes) {
    const r = carbonUncertainty(usable.filter((s) => s.forestType === t), settings);
    if (r !== null) rows.push(row(t, r));
  }
  return { ...unavailable(config, kind, ''), rows, confidence: whole.confidence, tree_error_scope: whole.treeErrorScope, missing: null };
}

/** The four sections of a region or of the nation (null: the setting turns them off). */
export interface CarbonSections {
  readonly carbon: CarbonUncertaintySection | null;
  readonly treeCarbon: CarbonUncertaintySection | null;
  readonly carbonChange: CarbonUncertaintySection | null;
  readonly treeCarbonChange: CarbonUncertaintySection | null;
}

const SECTION_KEYS = { stock: 'carbon', trees: 'treeCarbon', change: 'carbonChange', treeChange: 'treeCarbonChange' } as const satisfies Record<CarbonSectionKind, keyof CarbonSections>;
const KINDS = Object.keys(SECTION_KEYS) as CarbonSectionKind[];
const OFF: CarbonSections = { carbon: null, treeCarbon: null, carbonChange: null, treeCarbonChange: null };

// Each section with the sums of its plots and the areas of its strata; the height models read once for all four.
async function sections(
  db: Queryable,
  config: Settings,
  sums: Record<CarbonSectionKind, SectionSums>,
  areaOf: (kind: CarbonSectionKind) => (scope: string, forestType: string) => number | null,
): Promise<CarbonSections> {
  const forestTypes = [...new Set(KINDS.flatMap((k) => sums[k].plots.map((p) => p.forestType)))].sort();
  const heightModels = await heightModelErrors(db, forestTypes);
  const out: Record<keyof CarbonSections, CarbonUncertaintySection | null> = { ...OFF };
  for (const kind of KINDS) out[SECTION_KEYS[kind]] = carbonUncertaintySection(heightModels, config, kind, sums[kind].plots, sums[kind].without, areaOf(kind));
  return out;
}

const typesOf = (plots: readonly PlotSums[]): string[] => [...new Set(plots.map((p) => p.forestType))].sort();

/** A region's four sections: its forest types as strata, with the areas the region summary uses. */
export async function regionCarbonSections(db: Queryable, config: Settings, region: string, forestAreas: Readonly<Record<string, number>>): Promise<CarbonSections> {
  if (config.carbonDraws === 0) return OFF;
  const sums = await readRegionCarbonSums(db, region);
  return sections(db, config, sums, (kind) => {
    const areas = resolveForestAreas(typesOf(sums[kind].plots), forestAreas).areas;
    return (_scope, t) => areas[t] ?? null;
  });
}

/** The nation's four sections: region × forest type as strata. */
export async function nationalCarbonSections(
  db: Queryable,
  config: Settings,
  regions: ReadonlyArray<{ readonly region: string; readonly forestAreas?: Readonly<Record<string, number>> }>,
): Promise<CarbonSections> {
  if (config.carbonDraws === 0) return OFF;
  const sums = Object.fromEntries(KINDS.map((k): [CarbonSectionKind, SectionSums] => [k, { plots: [], without: 0 }])) as Record<CarbonSectionKind, SectionSums>;
  const areas = new Map<string, Readonly<Record<string, number | null>>>(); // by kind and region
  for (const r of regions) {
    const mine = await readRegionCarbonSums(db, r.region);
    for (const kind of KINDS) {
      sums[kind].plots.push(...mine[kind].plots);
      sums[kind].without += mine[kind].without;
      areas.set(`${kind}\u0000${r.region}`, resolveForestAreas(typesOf(mine[kind].plots), r.forestAreas ?? {}).areas);
    }
  }
  return sections(db, config, sums, (kind) => (scope, t) => areas.get(`${kind}\u0000${scope}`)?.[t] ?? null);
}

/** The summary rows of each section's variable with its whole interval added (the other rows as they are). */
export function withWholeInterval<R extends RegionRow>(rows: readonly R[], ...given: readonly (CarbonUncertaintySection | null | undefined)[]): R[] {
  const byKey = new Map<string, CarbonUncertaintyRow>();
  for (const section of given) for (const u of section?.rows ?? []) byKey.set(`${section?.variable}\u0000${u.forest_type}`, u);
  if (byKey.size === 0) return [...rows];
  return rows.map((r) => {
    const u = byKey.get(`${r.variable}\u0000${r.forest_type}`);
    if (!u) return r;
    return { ...r, whole_se: u.whole_se, whole_ci_low: u.whole_ci_low, whole_ci_high: u.whole_ci_high, total_whole_ci_low: u.total_whole_ci_low, total_whole_ci_high: u.total_whole_ci_high };
  });
}

export { CARBON_ERROR_SOURCES };
