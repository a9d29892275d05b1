import { leftOutSentence, variableLabel } from '@stemwise/core';
import type { DrawnCharts, Snapshot, SnapshotFitRow } from '../snapshot-payload';
import { figure, interval } from './figures';
import { html, safeSvg, type Markup } from './html';

// The diversity–disturbance fits of a region page: the charts, the two models (no verdict on them: the
// verdict belongs to the comparison), each verdict with the evidence behind it, what the verdicts mean,
// and the plots left out. Column meanings: docs/exports.md ("export fits").

const WHOLE = 'all';
const plots = (n: number): string => `${n} ${n === 1 ? 'plot' : 'plots'}`;
const fittedOn = (f: SnapshotFitRow): string => (f.scope === WHOLE ? 'whole forest type' : `plots of ${f.scope}`);

/** A p-value for people: '< 0.001' below it, else three decimals; '–' when missing. */
export function pValue(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '–';
  return p < 0.001 ? '< 0.001' : p.toFixed(3);
}

const OUTCOME_WORDS: Readonly<Record<string, string>> = { pass: 'passes', fail: 'fails', not_testable: 'not testable' };
const outcome = (o: string | null | undefined): string => (o ? (OUTCOME_WORDS[o] ?? o) : '–');
const slopeP = (slope: number | null | undefined, p: number | null | undefined): string => (slope === null || slope === undefined ? '–' : `${figure(slope)} (p ${pValue(p)})`);

/** Plain words of each verdict, shown under the table. */
export const VERDICT_WORDS: ReadonlyArray<readonly [string, string]> = [
  ['hump', 'diversity is highest at intermediate disturbance: the parabola fits better than the straight line, bends downwards clearly, turns inside the observed range, and two straight lines split near the turn clearly rise and then fall.'],
  ['u shape', 'the mirror of a hump: diversity is lowest at intermediate disturbance, by the same four checks.'],
  ['increasing', 'no clear turn, but the straight line rises clearly (its slope differs from zero at p < 0.05): more disturbance, more diversity.'],
  ['decreasing', 'no clear turn, but the straight line falls clearly: more disturbance, less diversity.'],
  ['none', 'the plots show no clear relation, or too few plots to judge; a common and honest answer.'],
];

function modelsTable(fits: readonly SnapshotFitRow[]): Markup {
  return html`<table id="fits"><thead><tr><th>Fitted on</th><th>Forest type</th><th>Model</th><th class="num">Plots</th><th class="num">Slope b1 (p)</th><th class="num">Curvature b2 (p)</th><th class="num">R²</th><th class="num">AICc</th></tr></thead><tbody>${fits.map(
    (f) => html`<tr><td>${fittedOn(f)}</td><td>${f.forest_type}</td><td>${f.model === 'linear' ? 'straight line' : 'parabola'}</td><td class="num">${f.n}</td><td class="num">${slopeP(f.b1, f.p_b1)}</td><td class="num">${slopeP(f.b2, f.p_b2)}</td><td class="num">${figure(f.r2)}</td><td class="num">${figure(f.aicc)}</td></tr>`,
  )}</tbody></table>`;
}

function evidenceTable(fits: readonly SnapshotFitRow[]): Markup {
  const verdicts = fits.filter((f) => f.model === 'quadratic');
  return html`<div class="table-scroll"><table id="verdict-evidence"><thead><tr><th>Fitted on</th><th>Forest type</th><th>Verdict</th><th class="num">ΔAICc (line − parabola)</th><th class="num">Curvature p</th><th class="num">Turning point</th><th>Mitchell-Olds &amp; Shaw</th><th class="num">Two lines: slope below (p)</th><th class="num">slope above (p)</th><th>Two-lines test</th><th class="num">Peak (95 % CI)</th><th class="num">Bootstrap interval</th></tr></thead><tbody>${verdicts.map(
    (f) => html`<tr data-forest-type="${f.forest_type}" data-scope="${f.scope}"><td>${fittedOn(f)}</td><td>${f.forest_type}</td><td><strong>${f.verdict.replace('_', ' ')}</strong></td><td class="num">${figure(f.delta_aicc)}</td><td class="num">${pValue(f.curvature_p)}</td><td class="num">${f.mos_turn_x === null || f.mos_turn_x === undefined ? '–' : `${figure(f.mos_turn_x)} (${f.mos_turn_inside === 'yes' ? 'inside' : 'outside'} the range)`}</td><td>${outcome(f.mos_result)}</td><td class="num">${slopeP(f.two_lines_slope_1, f.two_lines_p_1)}</td><td class="num">${slopeP(f.two_lines_slope_2, f.two_lines_p_2)}</td><td>${outcome(f.two_lines_result)}${f.two_lines_break_x === null || f.two_lines_break_x === undefined ? '' : ` (break at ${figure(f.two_lines_break_x)})`}</td><td class="num">${f.peak_x === null ? '–' : `${figure(f.peak_x)} (${interval(f.peak_ci_low, f.peak_ci_high)})`}</td><td class="num">${interval(f.peak_boot_low, f.peak_boot_high)}</td></tr>`,
  )}</tbody></table></div>`;
}

// Plots without the metric or the axis are not in a fit: how many, and why (one line per fit).
function leftOutList(fits: readonly SnapshotFitRow[]): Markup | null {
  const lines = fits
    .filter((f) => f.model === 'quadratic' && f.left_out_reasons)
    .map((f) => html`<li>${f.scope === WHOLE ? `${f.forest_type} as a whole` : `${f.forest_type}, plots of ${f.scope}`}: ${plots(f.plots_left_out ?? 0)} left out — ${leftOutSentence(f.left_out_reasons)}.</li>`);
  if (!lines.length) return null;
  return html`<div id="fits-left-out"><p>Plots left out of the fits because the value is undefined for them:</p><ul>${lines}</ul></div>`;
}

export function fitsSection(s: Snapshot<DrawnCharts>): Markup {
  const { charts, fits } = s.payload;
  const figures = charts.fits.map((c) => {
    const svg = safeSvg(c.svg);
    return html`<figure class="fit-chart" data-forest-type="${c.forest_type}">${svg ?? html`<p class="muted">No chart for ${c.forest_type}: ${c.missing ?? 'not available'}.</p>`}
<figcaption>${c.forest_type}: ${variableLabel(c.metric).name} against ${variableLabel(c.axis).name} for all ${c.points} plots of this forest type in the inventory; the ${c.highlighted} plots of ${s.region} are drawn highlighted. The curve and the verdict are those of the forest type as a whole.</figcaption></figure>`;
  });
  if (!fits.length) return html`${figures}<p class="muted">No fits stored yet for these forest types.</p>`;
  return html`${figures}
<h3>The two models</h3>
${modelsTable(fits)}
<h3>Verdicts and the evidence behind them</h3>
${evidenceTable(fits)}
<p class="muted">A verdict compares the two models; it is not a property of either. ΔAICc above 0 favours the parabola after the penalty for its extra term. The Mitchell-Olds &amp; Shaw test passes when the curvature is clear (p &lt; 0.05, of the sign of the shape) and the turning point lies inside the observed range; the two-lines test when lines split near the turn have clear slopes of opposite signs. The peak and its intervals are given with a hump or U verdict only (delta method; percentile bootstrap beside it).</p>
<dl id="verdict-words">${VERDICT_WORDS.map(([word, meaning]) => html`<dt>${word}</dt><dd>${meaning}</dd>`)}</dl>
<p class="muted">A verdict summarises survey plots; it is not proof of cause (soil, altitude or history can make or hide a pattern).</p>
${leftOutList(fits)}`;
}
