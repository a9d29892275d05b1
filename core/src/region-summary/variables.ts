// How the summary's variables (columns of `export plots`) are named for people on the page and in charts.

export interface VariableLabel {
  /** Full name for tables. */
  readonly name: string;
  /** A few words for chart panels and cards. */
  readonly short: string;
  /** Unit, or '' for a plain number. */
  readonly unit: string;
}

const LABELS: Readonly<Record<string, VariableLabel>> = {
  stems_ha: { name: 'Stem density', short: 'Stems per ha', unit: 'stems/ha' },
  basal_area_m2_ha: { name: 'Basal area', short: 'Basal area (m²/ha)', unit: 'm²/ha' },
  qmd_cm: { name: 'Quadratic mean diameter', short: 'QMD (cm)', unit: 'cm' },
  agb_mg_ha: { name: 'Above-ground biomass', short: 'Biomass (Mg/ha)', unit: 'Mg/ha' },
  carbon_mg_ha: { name: 'Carbon in above-ground biomass', short: 'Carbon (Mg C/ha)', unit: 'Mg C/ha' },
  fisher_alpha: { name: "Fisher's alpha (per plot)", short: "Fisher's alpha", unit: '' },
  richness: { name: 'Species per plot', short: 'Species per plot', unit: 'species' },
  disturbance_index: { name: 'Disturbance index (0 none – 1 severe)', short: 'Disturbance index', unit: '' },
  pioneer_ba_share: { name: 'Pioneer share of basal area', short: 'Pioneer share', unit: '' },
  light_demander_ba_share: { name: 'Light-demanding share of basal area', short: 'Light-demanding share', unit: '' },
  shade_tolerant_ba_share: { name: 'Shade-tolerant share of basal area', short: 'Shade-tolerant share', unit: '' },
  unassigned_ba_share: { name: 'Unassigned share of basal area', short: 'Unassigned share', unit: '' },
  logging_score: { name: 'Logging score (0–1)', short: 'Logging score', unit: '' },
  fire_score: { name: 'Fire score (0–1)', short: 'Fire score', unit: '' },
  shannon: { name: 'Shannon index', short: 'Shannon', unit: '' },
  carbon_net_change_mg_ha_yr: { name: 'Net carbon change between visits', short: 'Net carbon change (Mg C/ha/yr)', unit: 'Mg C/ha/yr' },
  agb_net_change_mg_ha_yr: { name: 'Net biomass change between visits', short: 'Net biomass change (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_growth_mg_ha_yr: { name: 'Biomass gained by survivor growth', short: 'Growth (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_recruitment_mg_ha_yr: { name: 'Biomass gained by recruits', short: 'Recruitment (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  agb_loss_mg_ha_yr: { name: 'Biomass lost by death and removal', short: 'Losses (Mg/ha/yr)', unit: 'Mg/ha/yr' },
  mortality_annual: { name: 'Annual mortality (share of trees per year)', short: 'Mortality per year', unit: '' },
  recruitment_annual: { name: 'Annual recruitment (share of trees per year)', short: 'Recruitment per year', unit: '' },
  dbh_increment_cm_yr: { name: 'Diameter growth of survivors', short: 'Diameter growth (cm/yr)', unit: 'cm/yr' },
};

/** Total units of per-hectare variables (mean × forest area). */
const TOTAL_UNITS: Readonly<Record<string, string>> = {
  stems_ha: 'stems',
  basal_area_m2_ha: 'm²',
  agb_mg_ha: 'Mg',
  carbon_mg_ha: 'Mg C',
};

export function variableLabel(variable: string): VariableLabel {
  return LABELS[variable] ?? { name: variable, short: variable, unit: '' };
}

export function totalUnit(variable: string): string {
  return TOTAL_UNITS[variable] ?? '';
}

/** The figures shown as headline cards, in order. */
export const HEADLINE_VARIABLES = ['stems_ha', 'basal_area_m2_ha', 'agb_mg_ha', 'carbon_mg_ha', 'fisher_alpha', 'richness', 'disturbance_index'] as const;
