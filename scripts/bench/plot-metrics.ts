// Benchmark of computePlotMetrics alone (no database): 8,000 plots, 1,000,000 stems of invented
// species. Run: npm run bench -- --only plot-metrics
// The pipeline's budget is ~10 s for this volume including database I/O; this measures the science part.

import { computePlotMetrics, fitHeightDiameter, GUILDS, SpeciesIndex, type PlotVisitInput, type SpeciesReference, type StemInput } from '@stemwise/core/science';

let seed = 12345;
const rand = (): number => {
  seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0; // LCG (Numerical Recipes constants)
  return seed / 2 ** 32;
};

const SYLLABLES = ['ve', 'lo', 'tra', 'qu', 'en', 'na', 'pel', 'ra', 'mo', 'os', 'ta', 'ri', 'du', 'xa'];
const word = (n: number): string => {
  let s = '';
  for (let i = 0; i < n; i += 1) s += SYLLABLES[Math.floor(rand() * SYLLABLES.length)];
  return s;
};

const rows: SpeciesReference[] = [];
const seen = new Set<string>();
while (rows.length < 400) {
  const genus = `${word(2)}`;
  const name = `${genus.charAt(0).toUpperCase()}${genus.slice(1)} ${word(3)}`;
  if (seen.has(name)) continue;
  seen.add(name);
  rows.push({
    name,
    family: `${word(2)}aceae`.replace(/^./, (c) => c.toUpperCase()),
    guild: GUILDS[Math.floor(rand() * 3)],
    woodDensity: rand() < 0.8 ? 0.3 + 0.6 * rand() : null,
    synonyms: rand() < 0.2 ? [`${name.split(' ')[0]} ${word(3)}x`] : [],
  });
}
const index = new SpeciesIndex(rows);

const N_PLOTS = 8000;
const STEMS_PER_PLOT = 125;
const plots: { visit: PlotVisitInput; stems: StemInput[] }[] = [];
for (let p = 0; p < N_PLOTS; p += 1) {
  const stems: StemInput[] = [];
  for (let i = 0; i < STEMS_PER_PLOT; i += 1) {
    const u = rand();
    const sp = rows[Math.floor(Math.pow(rand(), 2) * rows.length)];
    const inSubplot = rand() < 0.15;
    const dbh = inSubplot ? 5 + 4.9 * rand() : 10 + 60 * Math.pow(rand(), 3);
    stems.push({
      species: u < 0.05 ? 'indet' : u < 0.08 ? `${sp.name.split(' ')[0]} sp.` : u < 0.1 ? 'Zzz unknownus' : sp.name,
      dbhCm: dbh,
      heightM: rand() < 0.1 ? 5 + 0.6 * dbh : null,
      status: u > 0.97 ? 'stump' : u > 0.93 ? 'dead' : 'live',
      stumpCause: u > 0.97 ? 'logged' : null,
      fireDamage: rand() < 0.1 ? 1 : 0,
      inSubplot,
    });
  }
  plots.push({
    visit: { areaHa: 0.25, dbhMinCm: 10, subplotAreaHa: 0.04, subplotDbhMinCm: 5, loggingClass: 1, fireClass: 0, climate: 'moist' },
    stems,
  });
}
const dd = Array.from({ length: 60 }, (_, i) => 10 + i);
const heightModel = fitHeightDiameter(dd, dd.map((d) => 5 + 0.6 * d));

// One warm-up pass (JIT), then the best of three timed passes.
let best = Number.POSITIVE_INFINITY;
let checksum = 0;
for (let pass = 0; pass < 4; pass += 1) {
  checksum = 0;
  const t0 = performance.now();
  for (const { visit, stems } of plots) {
    const { metrics } = computePlotMetrics(visit, stems, index, { heightModel });
    checksum += metrics.agbMgHa + (metrics.fisherAlpha ?? 0);
  }
  const ms = performance.now() - t0;
  if (pass > 0) best = Math.min(best, ms);
}
console.log(
  `computePlotMetrics: ${N_PLOTS} plots, ${N_PLOTS * STEMS_PER_PLOT} stems, best of 3 after warm-up ${best.toFixed(0)} ms ` +
    `(${((N_PLOTS * STEMS_PER_PLOT) / (best / 1000) / 1e6).toFixed(2)} M stems/s; checksum ${checksum.toFixed(3)})`,
);
