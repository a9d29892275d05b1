import { problemLine } from '@stemwise/db';
import type { BatchReport } from '@stemwise/core';

const n = (x: number) => x.toLocaleString('en-US');

/** Bytes for people: 512 B, 1.2 kB, 27.3 MB. */
export function formatBytes(b: number): string {
  if (b < 1000) return `${b} B`;
  if (b < 1e6) return `${(b / 1e3).toFixed(1)} kB`;
  if (b < 1e9) return `${(b / 1e6).toFixed(1)} MB`;
  return `${(b / 1e9).toFixed(2)} GB`;
}

/** A batch report as text for a terminal: state, counts, progress, then issues grouped by rule. */
export function formatBatchReport(r: BatchReport, perRule = 5): string {
  const out: string[] = [];
  out.push(`batch ${r.id}: ${r.state}${r.failureReason ? ` (${r.failureReason})` : ''}`);
  out.push(`  submitted ${r.createdAt} by ${r.submittedBy}; files ${r.files.map((f) => `${f.name} (${formatBytes(f.bytes)})`).join(', ')}`);
  const opts = [r.options.skip_invalid && '--skip-invalid', r.options.replace && '--replace', r.options.delimiter !== ',' && `--delimiter '${r.options.delimiter}'`, r.options.decimal_comma && '--decimal-comma'].filter(Boolean);
  if (opts.length) out.push(`  options ${opts.join(' ')}`);
  const c = r.counts;
  out.push(`  rows: plots ${n(c.plotsRows)}, trees ${n(c.treesRows)}; loaded: plots ${n(c.plotsLoaded)}, stems ${n(c.stemsLoaded)}; rows with errors ${n(c.rowsSkipped)}`);
  const p = r.progress;
  out.push(`  progress: read ${formatBytes(p.bytesRead)} of ${formatBytes(p.bytesTotal)}, checked ${n(p.rowsChecked)} rows, loaded ${n(p.rowsLoaded)} rows (attempt ${r.attempts})`);
  out.push(`  ${n(c.errors)} error${c.errors === 1 ? '' : 's'}, ${n(c.warnings)} warning${c.warnings === 1 ? '' : 's'}`);
  for (const severity of ['error', 'warning'] as const) {
    const groups = r.issues.filter((g) => g.severity === severity);
    if (!groups.length) continue;
    out.push('', `${severity}s by rule:`);
    for (const g of groups) {
      out.push(`  ${g.rule} (${n(g.count)})${g.summary ? ` — ${g.summary}` : ''}`);
      for (const f of g.first.slice(0, perRule)) out.push(`    ${f.file}${f.line === null ? '' : `:${f.line}`}  ${f.message}`);
      if (g.count > Math.min(perRule, g.first.length)) out.push(`    … ${n(g.count - Math.min(perRule, g.first.length))} more`);
    }
  }
  if (r.unresolvedNames.length) {
    out.push('', 'species names not resolved to a species of the reference list:');
    for (const u of r.unresolvedNames.slice(0, 20)) out.push(`  ${u.name} (${u.level}, ${n(u.stems)} stem${u.stems === 1 ? '' : 's'})`);
    if (r.unresolvedNames.length > 20) out.push(`  … ${n(r.unresolvedNames.length - 20)} more`);
  }
  if (r.computeProblems.length) {
    out.push('', 'not computed (the rest of the batch was):');
    for (const p of r.computeProblems.slice(0, 20)) out.push(`  ${problemLine(p)}`);
    if (r.computeProblems.length > 20) out.push(`  … ${n(r.computeProblems.length - 20)} more`);
  }
  return `${out.join('\n')}\n`;
}

/** Progress as a plain line (logs, pipes). */
export function progressLine(p: { bytesTotal: number; bytesRead: number; rowsChecked: number; rowsLoaded: number }): string {
  return `progress: read ${formatBytes(p.bytesRead)} of ${formatBytes(p.bytesTotal)}, checked ${n(p.rowsChecked)} rows, loaded ${n(p.rowsLoaded)} rows`;
}

function bar(fraction: number, width = 24): string {
  const f = Math.max(0, Math.min(1, Number.isFinite(fraction) ? fraction : 0));
  const full = Math.round(f * width);
  return `[${'#'.repeat(full)}${'.'.repeat(width - full)}]`;
}

/** Three bars for a terminal: bytes read of the total, rows checked and rows loaded (scaled by the bytes read). */
export function progressBars(p: { bytesTotal: number; bytesRead: number; rowsChecked: number; rowsLoaded: number }): string[] {
  const read = p.bytesTotal > 0 ? p.bytesRead / p.bytesTotal : 0;
  const loaded = p.rowsChecked > 0 ? (p.rowsLoaded / p.rowsChecked) * read : 0;
  return [
    `read    ${bar(read)} ${String(Math.round(read * 100)).padStart(3)}%  ${formatBytes(p.bytesRead)} of ${formatBytes(p.bytesTotal)}`,
    `checked ${bar(read)} ${n(p.rowsChecked)} rows`,
    `loaded  ${bar(loaded)} ${n(p.rowsLoaded)} rows`,
  ];
}
