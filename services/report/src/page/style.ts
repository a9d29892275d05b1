// The report's own plain look: paper background, spruce green accents, amber for cautions.
export const PAGE_CSS = `
:root { --ink: #22271f; --muted: #5d6259; --line: #d8d4c7; --paper: #faf9f5; --card: #ffffff; --accent: #2f5d50; --accent-soft: #e5eee9; --warn: #9a6414; --warn-soft: #fbf1dc; }
* { box-sizing: border-box; }
html { font-size: 15px; }
body { margin: 0; background: var(--paper); color: var(--ink); font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; line-height: 1.45; }
main, .top > div, footer > div { max-width: 1120px; margin: 0 auto; padding: 0 20px; }
.top { background: var(--accent); color: #fff; padding: 14px 0 12px; }
.top a { color: #fff; }
.top .where { font-size: .85rem; opacity: .85; }
.top h1 { margin: 2px 0 0; font-size: 1.6rem; font-weight: 600; }
.facts { display: flex; flex-wrap: wrap; gap: 6px 22px; margin: 14px 0 4px; color: var(--muted); font-size: .92rem; }
.facts b { color: var(--ink); font-weight: 600; }
h2 { font-size: 1.2rem; margin: 30px 0 10px; padding-bottom: 4px; border-bottom: 2px solid var(--accent-soft); }
h3 { font-size: 1rem; margin: 18px 0 8px; }
.caution { background: var(--warn-soft); border-left: 5px solid var(--warn); padding: 10px 14px; margin: 16px 0; }
.caution ul { margin: 6px 0 0 18px; padding: 0; }
.cards { display: grid; grid-template-columns: repeat(auto-fill, minmax(230px, 1fr)); gap: 12px; }
.card { background: var(--card); border: 1px solid var(--line); border-radius: 6px; padding: 10px 12px; }
.card .label { color: var(--muted); font-size: .85rem; }
.card .value { font-size: 1.55rem; font-weight: 600; color: var(--accent); font-variant-numeric: tabular-nums; }
.card .unit { font-size: .9rem; color: var(--muted); font-weight: normal; }
.card .ci, .card .se, .card .n, .card .total { font-size: .85rem; font-variant-numeric: tabular-nums; }
figure { margin: 12px 0 18px; background: var(--card); border: 1px solid var(--line); border-radius: 6px; padding: 10px; overflow-x: auto; }
figure svg { max-width: 100%; height: auto; display: block; }
figcaption { color: var(--muted); font-size: .85rem; margin-top: 6px; }
table { border-collapse: collapse; width: 100%; background: var(--card); font-size: .9rem; margin: 6px 0 14px; }
th, td { border-bottom: 1px solid var(--line); padding: 5px 8px; text-align: left; vertical-align: top; }
th { background: var(--accent-soft); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tbody tr:nth-child(even) td { background: #f6f4ee; }
tr.whole td { font-weight: 600; }
.notes li { margin-bottom: 4px; }
.downloads a { display: inline-block; margin: 0 14px 6px 0; }
.muted { color: var(--muted); }
footer { margin: 40px auto 30px; color: var(--muted); font-size: .85rem; }
.regions td a { font-weight: 600; }
#verdict-words { display: grid; grid-template-columns: max-content 1fr; gap: 4px 14px; font-size: .9rem; margin: 8px 0 12px; }
#verdict-words dt { font-weight: 600; }
#verdict-words dd { margin: 0; }
#verdict-evidence td, #verdict-evidence th { font-size: .82rem; padding: 4px 5px; }
#verdict-evidence td.num, #verdict-evidence th.num { white-space: normal; }
.table-scroll { overflow-x: auto; }
.nowrap { white-space: nowrap; }
#plot-table th.num { white-space: normal; min-width: 4.5em; }
#plot-table td:nth-child(-n+3) { white-space: nowrap; }
.map-choice { margin: 6px 0 8px; }
.map-choice select { margin: 0 6px; }
.flag { display: inline-block; margin-left: 6px; padding: 0 5px; border: 1px solid var(--warn); border-radius: 3px; color: var(--warn); background: var(--warn-soft); font-size: .75rem; font-weight: 600; white-space: nowrap; }
@media print {
  html { font-size: 10pt; }
  body { background: #fff; }
  .top { background: #fff; color: #000; border-bottom: 3px solid #000; }
  .top a { color: #000; text-decoration: none; }
  .no-print { display: none !important; }
  a { color: inherit; text-decoration: none; }
  .card, figure, table, tr, .caution { break-inside: avoid; }
  h2, h3 { break-after: avoid; }
  figure, .card { border-color: #999; }
  .table-scroll { overflow: visible; }
  #plot-table { font-size: 8.5pt; }
  #plot-map svg, figure svg { max-width: 100%; height: auto; }
  @page { margin: 14mm; }
}
`;
