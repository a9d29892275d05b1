import { findRegionPlot, listHeightModels, listPlotChanges, listPlotVisits, listVisitStems, type PlotStemRow, type PlotVisitRow, type Queryable } from '@stemwise/db';
import { basalAreaM2, currentSpecies, diameterClasses, expansionFactor, measuredFromCm, plotStandTable, type SpeciesIndex } from '@stemwise/core';
import { renderDiameterChartSvg } from '@stemwise/core/charts';
import type { PlotDiameterClass, PlotPageData, SpeciesLine } from './page/plot-page';

// Everything the page of one plot shows, read and worked out here; the page only lays it out.

/** The live stems of a visit that count (at or above the minimum of the area they were recorded on), with their expansion factors. */
export function countedLiveStems(visit: PlotVisitRow, stems: readonly PlotStemRow[]): Array<PlotStemRow & { weight: number }> {
  const out: Array<PlotStemRow & { weight: number }> = [];
  for (const s of stems) {
    if (s.status !== 'live') continue;
    if (s.inSubplot && !(visit.subplotAreaHa > 0)) continue; // compute refuses such a visit; nothing to draw
    if (s.dbhCm < (s.inSubplot ? visit.subplotDbhMinCm : visit.dbhMinCm)) continue;
    out.push({ ...s, weight: expansionFactor(s.inSubplot, visit.areaHa, visit.subplotAreaHa) });
  }
  return out;
}

/** Live stems by accepted species (recorded names resolved as compute resolves them), largest basal area first. */
export function speciesLines(stems: ReadonlyArray<PlotStemRow & { weight: number }>, index: SpeciesIndex): SpeciesLine[] {
  const lines = new Map<string, SpeciesLine & { recordedSet: Set<string> }>();
  for (const s of stems) {
    const r = index.resolve(s.species);
    const accepted = r.species?.name ?? null;
    const key = accepted ?? `?${s.species ?? ''}`;
    let line = lines.get(key);
    if (!line) {
      line = { accepted, recorded: [], family: r.species?.family ?? r.family, guild: r.species?.guild ?? null, level: r.level, woodDensity: r.species?.woodDensity ?? null, stems: 0, basalAreaM2Ha: 0, recordedSet: new Set() };
      lines.set(key, line);
    }
    if (s.species !== null && s.species !== accepted) line.recordedSet.add(s.species);
    line.stems += 1;
    line.basalAreaM2Ha += s.weight * basalAreaM2(s.dbhCm);
  }
  return [...lines.values()]
    .map(({ recordedSet, ...l }) => ({ ...l, recorded: [...recordedSet].sort() }))
    .sort((a, b) => b.basalAreaM2Ha - a.basalAreaM2Ha || (a.accepted ?? '~').localeCompare(b.accepted ?? '~'));
}

/**
 * The diameter distribution of counted live stems in the stand-table classes from the reporting
 * threshold, with one class in front for stems measured below it (a subplot); classes below what the
 * visit measured are left out (docs/methods.md#diameter-distribution-of-a-plot).
 */
export function plotDiameterClasses(visit: PlotVisitRow, stems: ReadonlyArray<PlotStemRow & { weight: number }>, thresholdCm: number): PlotDiameterClass[] {
  const from = measuredFromCm(visit.dbhMinCm, visit.subplotAreaHa, visit.subplotDbhMinCm);
  const classes = [...(from < thresholdCm ? [{ lowerCm: from, upperCm: thresholdCm }] : []), ...diameterClasses(thresholdCm)];
  // the stand table's per-stem biomass is not needed here: stems and basal area only
  const expanded = { dbhCm: stems.map((s) => s.dbhCm), weight: stems.map((s) => s.weight), basalAreaM2: stems.map((s) => basalAreaM2(s.dbhCm)), agbKg: stems.map(() => 0) };
  const perHa = plotStandTable(expanded, classes, from);
  const recorded = plotStandTable({ ...expanded, weight: stems.map(() => 1) }, classes, from);
  const out: PlotDiameterClass[] = [];
  classes.forEach((c, i) => {
    const f = perHa[i];
    if (f) out.push({ lowerCm: c.lowerCm, upperCm: c.upperCm, stemsHa: f.stemsHa, basalAreaM2Ha: f.basalAreaM2Ha, stems: recorded[i]?.stemsHa ?? 0 });
  });
  return out;
}

/** The data of a plot's page; null when the region has no plot of this key. */
export async function readPlotPage(db: Queryable, region: string, plotKey: string, thresholdCm: number): Promise<PlotPageData | null> {
  const plot = await findRegionPlot(db, region, plotKey);
  if (!plot) return null;
  const visits = await listPlotVisits(db, plot.id);
  const changes = await listPlotChanges(db, plot.id);
  const [heightModel] = await listHeightModels(db, [plot.forestType]);
  const shown = [...visits].reverse().find((v) => v.metrics !== null) ?? visits.at(-1) ?? null;
  let classes: PlotDiameterClass[] = [];
  let species: SpeciesLine[] = [];
  let diameterSvg: string | null = null;
  if (shown) {
    const stems = countedLiveStems(shown, await listVisitStems(db, shown.visitId));
    classes = plotDiameterClasses(shown, stems, thresholdCm);
    species = speciesLines(stems, (await currentSpecies(db)).index);
    diameterSvg = await renderDiameterChartSvg(classes, `Diameter distribution, visit of ${shown.surveyDate}`);
  }
  return { region, plot, visits, changes, shown, classes, diameterSvg, species, heightModel: heightModel ?? null };
}
