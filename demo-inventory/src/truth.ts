// truth.json: what the generator planted, in a few kilobytes whatever the size of the run —
// running sums per forest type, never a row per plot.

import type { BadRowRecord } from './bad-rows';
import { LOGGING_SATURATION_FRAC } from './disturbance-index';
import { GUILD_RESPONSE, PLANTED_CURVES } from './planted-curves';
import type { ExpectedChange } from './change-expectation';
import { PLANTED_CHANGE, REVISIT } from './planted-change';
import type { GeneratedPlot } from './plot-generator';
import type { SecondVisit } from './second-visit';
import { COUNTRY, FOREST_TYPE_PROFILES, FOREST_TYPES, REGIONS, SURVEY_YEARS, type ForestType } from './scenario';
import { FLORA_DEFAULTS, type Flora } from './species';
import { HEIGHT_CURVE } from './stand';

export const TRUTH_FORMAT = 'stemwise-demo-truth/1';

/** Running sums of one forest type: latent d against the realised index, and the target alpha. */
class TypeSums {
  n = 0;
  sd = 0;
  sx = 0;
  sdd = 0;
  sxx = 0;
  sdx = 0;
  absDiff = 0;
  minX = Infinity;
  maxX = -Infinity;
  alpha = 0;

  add(d: number, x: number, alpha: number): void {
    this.n += 1;
    this.sd += d;
    this.sx += x;
    this.sdd += d * d;
    this.sxx += x * x;
    this.sdx += d * x;
    this.absDiff += Math.abs(x - d);
    this.minX = Math.min(this.minX, x);
    this.maxX = Math.max(this.maxX, x);
    this.alpha += alpha;
  }

  // Pearson's r = (n Σdx − Σd Σx) / √((n Σd² − (Σd)²)(n Σx² − (Σx)²)); null under 3 plots or no spread.
  correlation(): number | null {
    if (this.n < 3) return null;
    const cov = this.n * this.sdx - this.sd * this.sx;
    const vd = this.n * this.sdd - this.sd * this.sd;
    const vx = this.n * this.sxx - this.sx * this.sx;
    return vd > 0 && vx > 0 ? cov / Math.sqrt(vd * vx) : null;
  }
}

/** Counts and sums gathered plot by plot. */
export class TruthTally {
  readonly plotsByType: Record<ForestType, number> = { wet: 0, moist: 0, dry: 0 };
  readonly plotsByRegion: Record<string, number> = {};
  readonly stems = {
    rows: 0, live_main: 0, live_subplot: 0, dead: 0, stumps_logged: 0, stumps_natural: 0, stumps_unknown: 0,
    with_height: 0, live_main_identified: 0, live_main_unidentified: 0, written_as_synonym: 0, written_unlisted: 0,
  };
  readonly sums: Record<ForestType, TypeSums> = { wet: new TypeSums(), moist: new TypeSums(), dry: new TypeSums() };
  plotsWithHeights = 0;
  readonly secondVisits = {
    plots_by_forest_type: { wet: 0, moist: 0, dry: 0 } as Record<ForestType, number>,
    stem_rows: 0, died_standing: 0, died_fallen_absent: 0, logged: 0, recruits: 0, ingrowth_from_subplot: 0,
    years_min: Infinity, years_max: -Infinity, date_min: '9999-12-31', date_max: '0000-01-01',
  };
  private readonly indexShift: Record<ForestType, { n: number; sum: number; abs: number }> = {
    wet: { n: 0, sum: 0, abs: 0 }, moist: { n: 0, sum: 0, abs: 0 }, dry: { n: 0, sum: 0, abs: 0 },
  };

  constructor(readonly flora: Flora) {}

  /** The second visit's tallies: what happened to the first visit's live trees, and the shift of the disturbance index. */
  addSecondVisit(plot: GeneratedPlot, next: SecondVisit): void {
    const v = this.secondVisits;
    v.plots_by_forest_type[plot.row.forestType] += 1;
    v.stem_rows += next.stems.length;
    v.years_min = Math.min(v.years_min, next.years);
    v.years_max = Math.max(v.years_max, next.years);
    if (next.row.surveyDate < v.date_min) v.date_min = next.row.surveyDate;
    if (next.row.surveyDate > v.date_max) v.date_max = next.row.surveyDate;
    const later = new Map(next.stems.map((s) => [s.treeId, s]));
    const before = new Map(plot.stems.map((s) => [s.treeId, s]));
    for (const s of plot.stems) {
      if (s.status !== 'live') continue;
      const t = later.get(s.treeId);
      if (t === undefined) v.died_fallen_absent += 1;
      else if (t.status === 'dead') v.died_standing += 1;
      else if (t.status === 'stump') v.logged += 1;
      else if (s.inSubplot && !t.inSubplot) v.ingrowth_from_subplot += 1;
    }
    for (const t of next.stems) if (!before.has(t.treeId) && !t.inSubplot) v.recruits += 1;
    const shift = this.indexShift[plot.row.forestType];
    const dx = next.realised.disturbanceIndex - plot.realised.disturbanceIndex;
    shift.n += 1;
    shift.sum += dx;
    shift.abs += Math.abs(dx);
  }

  indexShiftOf(type: ForestType): { mean: number | null; mean_abs: number | null } {
    const s = this.indexShift[type];
    return { mean: s.n > 0 ? round(s.sum / s.n) : null, mean_abs: s.n > 0 ? round(s.abs / s.n) : null };
  }

  add(plot: GeneratedPlot, next: SecondVisit | null = null): void {
    if (next !== null) this.addSecondVisit(plot, next);
    const type = plot.row.forestType;
    this.plotsByType[type] += 1;
    this.plotsByRegion[plot.row.region] = (this.plotsByRegion[plot.row.region] ?? 0) + 1;
    this.sums[type].add(plot.latentDisturbance, plot.realised.disturbanceIndex, plot.targetAlpha);
    let heights = 0;
    for (const s of plot.stems) {
      const c = this.stems;
      c.rows += 1;
      if (s.heightM !== null) heights += 1;
      if (s.status === 'live') {
        if (s.inSubplot) c.live_subplot += 1;
        else if (s.identified) c.live_main_identified += 1;
        else c.live_main_unidentified += 1;
        if (!s.inSubplot) c.live_main += 1;
      } else if (s.status === 'dead') c.dead += 1;
      else if (s.stumpCause === 'logged') c.stumps_logged += 1;
      else if (s.stumpCause === 'natural') c.stumps_natural += 1;
      else c.stumps_unknown += 1;
      if (s.identified) {
        const sp = this.flora.species[s.trueSpecies];
        if (s.species !== sp.name) c.written_as_synonym += 1;
        if (!sp.listed) c.written_unlisted += 1;
      }
    }
    this.stems.with_height += heights;
    if (heights > 0) this.plotsWithHeights += 1;
  }
}

export interface TruthRun {
  readonly seed: number;
  readonly plots: number;
  readonly gzip: boolean;
  readonly heightsFraction: number;
  readonly badRowsRequested: number;
  readonly badRows: readonly BadRowRecord[];
  readonly files: Readonly<Record<string, string>>;
  /** The expected change under the planted process, from an independent simulation (null when not asked for). */
  readonly expected: { readonly seed: number; readonly byType: Record<ForestType, ExpectedChange> } | null;
}

export type Truth = ReturnType<typeof buildTruth>;

const round = (x: number | null, digits = 4): number | null => (x === null ? null : Math.round(x * 10 ** digits) / 10 ** digits);

/** The truth file's content. */
export function buildTruth(tally: TruthTally, run: TruthRun) {
  const flora = tally.flora;
  return {
    format: TRUTH_FORMAT,
    generator: '@stemwise/demo-inventory',
    note: 'Invented data for demonstration and tests: not a real country, forest or species.',
    seed: run.seed,
    options: { plots: run.plots, gzip: run.gzip, heights_fraction: run.heightsFraction, bad_rows: run.badRowsRequested },
    files: run.files,
    scenario: {
      country: COUNTRY.name,
      bounding_box: { lat_min: COUNTRY.latMin, lat_max: COUNTRY.latMax, lon_min: COUNTRY.lonMin, lon_max: COUNTRY.lonMax },
      location_note: 'open ocean of the tropical South Pacific, over 1,000 km from any real land',
      regions: REGIONS.map((r) => ({ code: r.code, name: r.name })),
      forest_types: [...FOREST_TYPES],
      survey_years: [...SURVEY_YEARS],
      survey_years_note: 'first visits; the second visits of re-measured plots come 4-6 years later',
      plot_design: '1 ha main plots (some 0.5 ha), dbh_min_cm 10; nested subplot of a tenth of the area for stems 5-10 cm',
      height_curve: { form: 'ln H = a + shift + b ln D + c (ln D)^2 + e', ...HEIGHT_CURVE, shift: typeShift() },
    },
    flora: {
      seed: FLORA_DEFAULTS.seed,
      species: flora.species.length,
      listed: flora.species.filter((s) => s.listed).length,
      unlisted: flora.species.filter((s) => !s.listed).length,
      with_synonyms: flora.species.filter((s) => s.synonyms.length > 0).length,
      genera: flora.genera.length,
      families: flora.families.length,
    },
    counts: {
      plots: run.plots,
      plots_by_forest_type: tally.plotsByType,
      plots_by_region: tally.plotsByRegion,
      plots_with_heights: tally.plotsWithHeights,
      stems: tally.stems,
      bad_rows: run.badRows.length,
    },
    disturbance: {
      index: {
        logging_removed_ba_frac: 'BA of logged stumps / (BA of live stems + BA of logged stumps), main plot, BA = pi (dbh/200)^2',
        logging_score: `mean(min(1, logging_removed_ba_frac / ${LOGGING_SATURATION_FRAC}), logging_class / 3)`,
        fire_score: 'mean(BA-weighted mean fire_damage of live main-plot stems / 3, fire_class / 3)',
        disturbance_index: '1 - (1 - logging_score) (1 - fire_score)',
      },
      latent: 'each plot draws d ~ Beta(a, b) and a logging share s ~ Beta; logging target 1-(1-d)^s, fire target 1-(1-d)^(1-s); classes, logged stumps and fire damage are drawn so that the realised index tracks d',
      by_forest_type: Object.fromEntries(
        FOREST_TYPES.map((t) => {
          const s = tally.sums[t];
          const profile = FOREST_TYPE_PROFILES[t];
          return [t, {
            plots: s.n,
            latent_beta: profile.disturbanceBeta,
            logging_share_mean: profile.loggingShareMean,
            correlation_latent_vs_index: round(s.correlation()),
            mean_abs_difference: round(s.n > 0 ? s.absDiff / s.n : null),
            index_mean: round(s.n > 0 ? s.sx / s.n : null),
            index_min: round(s.n > 0 ? s.minX : null),
            index_max: round(s.n > 0 ? s.maxX : null),
          }];
        }),
      ),
    },
    planted: {
      metric: 'fisher_alpha',
      axis: 'disturbance_index',
      how: 'each plot\'s target alpha = curve(realised disturbance_index) x exp(N(0, noise_sd_log)); its identified live main-plot stems are split into species by a Chinese restaurant process with that alpha, so Fisher\'s alpha of those stems follows the curve',
      by_forest_type: Object.fromEntries(
        FOREST_TYPES.map((t) => {
          const c = PLANTED_CURVES[t];
          const s = tally.sums[t];
          return [t, {
            shape: c.shape, formula: c.formula, parameters: c.parameters, vertex: c.vertex, noise_sd_log: c.noiseSdLog,
            mean_target_alpha: round(s.n > 0 ? s.alpha / s.n : null, 3),
          }];
        }),
      ),
      guild_response: {
        rule: 'a species\' chance to be drawn is multiplied by exp(g x) for its guild\'s g and the plot\'s disturbance_index x',
        g: GUILD_RESPONSE,
      },
    },
    change: {
      how: 'a share of the plots is measured again 4-6 years after the first visit, simulated forward from it: each live stem dies with probability 1 - exp(-death t), a live main-plot stem of 30 cm and more is felled with probability 1 - exp(-harvest t) (a logged stump), survivors grow by growth t x lognormal spread (mean kept) plus a tape error, subplot stems reaching 10 cm join the main plot, and Poisson(recruitment x live main-plot stems x t) recruits of 10 cm and more get new tree_ids (less the subplot ingrowth); of the trees dying, a share has fallen and is not recorded (absent); field classes are kept; recruits continue the plot\'s Chinese restaurant process, so its Fisher\'s alpha keeps its target',
      plot_rates: 'death = mortality (1 + mortality_logging L + mortality_fire F), harvest = harvest L, recruitment = recruitment (1 + recruitment_logging L + recruitment_fire F), growth = growth_cm_yr (1 + growth_logging L) (1 - growth_loss_per_fire_damage x fire_damage) (x 0.6 on the subplot); L and F are the plot\'s logging and fire intensities (1 - (1 - L)(1 - F) = latent d)',
      revisit: snakeCase(REVISIT),
      by_forest_type: Object.fromEntries(FOREST_TYPES.map((t) => [t, { ...snakeCase(PLANTED_CHANGE[t]), disturbance_index_shift: tally.indexShiftOf(t) }])),
      second_visits: {
        ...tally.secondVisits,
        years_min: round(Number.isFinite(tally.secondVisits.years_min) ? tally.secondVisits.years_min : null),
        years_max: round(Number.isFinite(tally.secondVisits.years_max) ? tally.secondVisits.years_max : null),
      },
      expected: run.expected === null ? null : {
        what: 'expected value under the planted process of each re-measured plot\'s annual mortality, annual recruitment and net carbon change (docs/methods.md#change-between-visits), computed from the true stems (true species wood density, the generator\'s mean height curve, Chave et al. 2014 eq. 4, carbon fraction 0.47) of an independent simulation with another seed; se is its Monte Carlo error',
        seed: run.expected.seed,
        by_forest_type: Object.fromEntries(FOREST_TYPES.map((t) => {
          const e = run.expected!.byType[t];
          const v = (x: { mean: number; se: number }) => ({ mean: round(x.mean, 6), se: round(x.se, 6) });
          return [t, { plots: e.plots, mortality_annual: v(e.mortality_annual), recruitment_annual: v(e.recruitment_annual), carbon_net_change_mg_ha_yr: v(e.carbon_net_change_mg_ha_yr) }];
        })),
      },
    },
    bad_rows: run.badRows,
  };
}

function snakeCase(o: object): Record<string, unknown> {
  return Object.fromEntries(Object.entries(o).map(([k, v]) => [k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`), v]));
}

function typeShift(): Record<ForestType, number> {
  return { wet: FOREST_TYPE_PROFILES.wet.heightShift, moist: FOREST_TYPE_PROFILES.moist.heightShift, dry: FOREST_TYPE_PROFILES.dry.heightShift };
}
