// Benchmark of the carbon uncertainty against the metrics it rests on (no database): a generated
// inventory of 10,880 plots and 1.36 M stems in 12 regions × 3 forest types. Times (best of 3 after a
// warm-up) the science of the metrics stage (computePlotMetrics of every visit, with the sums the
// uncertainty needs), and the uncertainty stage of a full recompute: every region's Monte Carlo (whole
// region and each forest type) and the national one, for the above-ground stock and the tree pool, at the
// default number of draws (the change section, over re-measured plots, costs as a stock section). The uncertainty
// stage must cost no more than the metrics stage (docs/methods.md#carbon-uncertainty).
// Run: npm run bench -- --only carbon-uncertainty [-- --draws N]. On a shared machine the figures are noisy.

import {
  carbonUncertainty,
  computePlotMetrics,
  createRng,
  DEFAULT_CARBON_DRAWS,
  fitHeightDiameter,
  GUILDS,
  SpeciesIndex,
  type CarbonMoments,
  type CarbonStratum,
  type Climate,
  type HeightModelError,
  type PlotVisitInput,
  type SpeciesReference,
  type StemInput,
} from '@stemwise/core/science';

const drawsAt = process.argv.indexOf('--draws');
const DRAWS = drawsAt >= 0 ? Number(process.argv[drawsAt + 1]) : DEFAULT_CARBON_DRAWS;
const rng = createRng(16);

const species: SpeciesReference[] = Array.from({ length: 300 }, (_, i) => ({
  name: `Genus${i % 60} species${i}`,
  family: `Family${i % 25}aceae`,
  guild: GUILDS[i % 3],
  woodDensity: rng.next() < 0.8 ? 0.3 + 0.6 * rng.next() : null,
  synonyms: [],
}));
const index = new SpeciesIndex(species);

const REGIONS = 12;
const TYPES: { name: string; climate: Climate }[] = [
  { name: 'dry', climate: 'dry' },
  { name: 'moist', climate: 'moist' },
  { name: 'wet', climate: 'wet' },
];
const N_PLOTS = 10_880;
const STEMS_PER_PLOT = 125;
const plots: { region: number; type: number; visit: PlotVisitInput; stems: StemInput[] }[] = [];
for (let p = 0; p < N_PLOTS; p += 1) {
  const type = p % 3;
  const stems: StemInput[] = [];
  for (let i = 0; i < STEMS_PER_PLOT; i += 1) {
    const inSubplot = rng.next() < 0.15;
    const dbh = inSubplot ? 5 + 4.9 * rng.next() : 10 + 60 * rng.next() ** 3;
    stems.push({
      species: species[rng.int(species.length)].name,
      dbhCm: dbh,
      heightM: rng.next() < 0.1 ? 5 + 0.6 * dbh : null,
      status: rng.next() < 0.05 ? 'dead' : 'live',
      stumpCause: null,
      fireDamage: 0,
      inSubplot,
    });
  }
  plots.push({
    region: p % REGIONS,
    type,
    visit: { areaHa: 0.25, dbhMinCm: 10, subplotAreaHa: 0.04, subplotDbhMinCm: 5, loggingClass: 0, fireClass: 0, climate: TYPES[type].climate },
    stems,
  });
}
const dd = Array.from({ length: 60 }, (_, i) => 10 + i);
// Two types with a local height model, one without (its heights come from the no-height model).
const models = [null, ...[1, 2].map(() => fitHeightDiameter(dd, dd.map((d, i) => (5 + 0.6 * d) * Math.exp(0.2 * Math.sin(i)))))];
const heightErrors = new Map<string, HeightModelError>(
  models.flatMap((m, t) => (m ? [[TYPES[t].name, { rse: m.rse, covariance: m.covariance ?? null }] as const] : [])),
);

function best(fn: () => number): { ms: number; check: number } {
  let ms = Number.POSITIVE_INFINITY;
  let check = 0;
  for (let pass = 0; pass < 4; pass += 1) {
    const t0 = performance.now();
    check = fn();
    if (pass > 0) ms = Math.min(ms, performance.now() - t0);
  }
  return { ms, check };
}

const moments: CarbonMoments[] = new Array(N_PLOTS);
const metricsStage = best(() => {
  let sum = 0;
  for (let p = 0; p < N_PLOTS; p += 1) {
    const { visit, stems, type } = plots[p];
    const r = computePlotMetrics(visit, stems, index, { heightModel: models[type], carbonMoments: true });
    moments[p] = r.carbonMoments as CarbonMoments;
    sum += r.metrics.agbMgHa;
  }
  return sum;
});

const AREA = 50_000; // ha per region × forest type
const strataOf = (subset: (p: (typeof plots)[number]) => boolean, byRegion: boolean): CarbonStratum[] => {
  const groups = new Map<string, CarbonStratum & { plots: CarbonMoments[] }>();
  plots.forEach((p, i) => {
    if (!subset(p)) return;
    const name = byRegion ? `r${p.region} / ${TYPES[p.type].name}` : TYPES[p.type].name;
    let g = groups.get(name);
    if (!g) groups.set(name, (g = { name, forestType: TYPES[p.type].name, size: AREA, plots: [] }));
    g.plots.push(moments[i]);
  });
  return [...groups.values()];
};
const settings = { draws: DRAWS, seed: 20261201, heightModels: heightErrors };
// What the summaries do in a full recompute: per region the whole region and each type; nationally the same over region × type strata.
const regionStrata = Array.from({ length: REGIONS }, (_, r) => strataOf((p) => p.region === r, true));
const nationStrata = strataOf(() => true, true);
const uncertaintyStage = best(() => {
  let sum = 0;
  for (const pool of ['aboveGround', 'trees'] as const) {
    for (const strata of [...regionStrata, nationStrata]) {
      sum += carbonUncertainty(strata, { ...settings, pool })?.whole.high ?? 0;
      for (const t of TYPES) sum += carbonUncertainty(strata.filter((s) => s.forestType === t.name), { ...settings, pool })?.whole.high ?? 0;
    }
  }
  return sum;
});

console.log(`generated inventory: ${N_PLOTS} plots, ${N_PLOTS * STEMS_PER_PLOT} stems, ${REGIONS} regions × ${TYPES.length} forest types; ${DRAWS} draws`);
console.log(`metrics stage (computePlotMetrics with the carbon sums): ${metricsStage.ms.toFixed(0)} ms (checksum ${metricsStage.check.toFixed(1)})`);
console.log(`uncertainty stage (${REGIONS} regions + national, each whole and per forest type; above-ground stock and tree pool): ${uncertaintyStage.ms.toFixed(0)} ms (checksum ${uncertaintyStage.check.toFixed(3)})`);
console.log(`uncertainty / metrics: ${(uncertaintyStage.ms / metricsStage.ms).toFixed(3)} (must be <= 1)`);
