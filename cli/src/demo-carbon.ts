import type { CarbonUncertaintySection } from '@stemwise/report';

// The demo's closing lines on carbon: the national above-ground carbon stock, the carbon in trees (live
// above- and below-ground and standing dead wood), and the net change between visits of both, each with its
// sampling-only and whole 95 % intervals and the share of each source of uncertainty
// (docs/methods.md#carbon-uncertainty).

const SOURCE_WORDS: Record<string, string> = {
  sampling: 'sampling',
  allometry: 'biomass model (per tree)',
  heightResidual: 'height model (per tree)',
  woodDensity: 'wood density (per tree)',
  heightParameters: 'height model parameters',
  rootShoot: 'root-to-shoot ratio (by row)',
};

const HEADINGS: Record<CarbonUncertaintySection['pool'], { title: string; unit: string; totalUnit: string }> = {
  'above-ground': { title: 'National above-ground carbon stock (live trees', unit: 'Mg C/ha', totalUnit: 'Mt C' },
  trees: { title: "National carbon in trees (live above- and below-ground, each plot's own root-to-shoot ratio, and standing dead wood", unit: 'Mg C/ha', totalUnit: 'Mt C' },
  'above-ground change': { title: 'National net above-ground carbon change between visits (live trees', unit: 'Mg C/ha/yr', totalUnit: 'Mt C/yr' },
  'tree change': { title: "National net change of carbon in trees between visits (live above- and below-ground, each visit's own root-to-shoot ratio, and standing dead wood", unit: 'Mg C/ha/yr', totalUnit: 'Mt C/yr' },
};

const perHa = (x: number): string => x.toFixed(2);

/** Lines for one national carbon section (none when the summary has no such section). */
export function demoCarbonLines(section: CarbonUncertaintySection | null | undefined): string[] {
  if (!section) return [];
  const h = HEADINGS[section.pool];
  if (section.missing !== null) return ['', `${h.title}), whole uncertainty: not available (${section.missing})`];
  const r = section.rows.find((x) => x.forest_type === 'all');
  if (!r) return [];
  const tonnes = (x: number | null): string => (x === null ? '—' : `${(x / 1e6).toFixed(3)} ${h.totalUnit}`);
  const shares = Object.entries(r.shares)
    .filter(([, v]) => v > 0)
    .sort((a, b) => b[1] - a[1])
    .map(([k, v]) => `${SOURCE_WORDS[k] ?? k} ${v < 0.0005 ? '< 0.1' : (100 * v).toFixed(1)} %`)
    .join(', ');
  return [
    '',
    `${h.title}; ${r.n_plots} plots; Monte Carlo of ${section.draws} draws, seed ${section.seed}):`,
    `  per hectare ${perHa(r.mean)} ${h.unit}; 95 % interval sampling only ${perHa(r.sampling_ci_low)}–${perHa(r.sampling_ci_high)}, whole ${perHa(r.whole_ci_low)}–${perHa(r.whole_ci_high)}`,
    `  total ${tonnes(r.total)}; sampling only ${tonnes(r.total_sampling_ci_low)}–${tonnes(r.total_sampling_ci_high)}, whole ${tonnes(r.total_whole_ci_low)}–${tonnes(r.total_whole_ci_high)}`,
    `  shares of the uncertainty: ${shares}`,
    `  not covered: ${section.not_covered.join('; ')}`,
  ];
}
