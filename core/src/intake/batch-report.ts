import { getBatch, listBatchIssues, listBatchProblems, listUnresolvedNames, problemView, type BatchFile, type BatchOptions, type BatchState, type ProblemView, type Queryable } from '@stemwise/db';
import { csvCell } from '../export/table-format';
import { ALL_RULES, ruleByCode } from './rules/catalogue';

/** The `column` of the row that stands for issues counted but not stored (see ingest's IssueLog). */
export const OMITTED_MARK = '*';

export interface IssueExample {
  file: string;
  line: number | null;
  column: string | null;
  value: string | null;
  message: string;
}

export interface RuleGroup {
  rule: string;
  severity: 'error' | 'warning';
  /** All occurrences, including those not stored. */
  count: number;
  /** When the rule fires (from the rules catalogue). */
  summary: string;
  /** The first occurrences, by file and line. */
  first: IssueExample[];
}

export interface BatchReport {
  id: string;
  state: BatchState;
  submittedBy: string;
  createdAt: string;
  updatedAt: string;
  loadedAt: string | null;
  files: BatchFile[];
  options: BatchOptions;
  attempts: number;
  failureReason: string | null;
  counts: {
    plotsRows: number;
    treesRows: number;
    plotsLoaded: number;
    stemsLoaded: number;
    rowsSkipped: number;
    errors: number;
    warnings: number;
  };
  progress: { bytesTotal: number; bytesRead: number; rowsChecked: number; rowsLoaded: number };
  /** Errors first, then warnings; within each, in the order of the rules catalogue (RULES.md). */
  issues: RuleGroup[];
  /** Species names of the batch that did not resolve to a species of the reference list. */
  unresolvedNames: Array<{ name: string; level: string; stems: number }>;
  /** What the latest recompute could not compute of this batch's plots, forest types and regions (the rest was computed). */
  computeProblems: ProblemView[];
}

/** State, counts, progress and issues grouped by rule (with the first `perRule` of each), or null. */
export async function batchReport(db: Queryable, id: string, perRule = 5): Promise<BatchReport | null> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return null;
  const b = await getBatch(db, id);
  if (!b) return null;
  const groups = new Map<string, RuleGroup>();
  for (const i of await listBatchIssues(db, id)) {
    const key = `${i.severity}\u0000${i.rule}`;
    let g = groups.get(key);
    if (!g) groups.set(key, (g = { rule: i.rule, severity: i.severity, count: 0, summary: ruleByCode(i.rule)?.summary ?? '', first: [] }));
    if (i.column === OMITTED_MARK && i.line === null) {
      g.count += Number(i.value ?? 0);
      continue;
    }
    g.count++;
    if (g.first.length < perRule) g.first.push({ file: i.file, line: i.line, column: i.column, value: i.value, message: i.message });
  }
  // Errors first; within a severity, in catalogue order (structure, field, row, cross, plausibility),
  // so a root cause (a bad plot row) comes before its consequences (that plot's stems refused).
  const order = (code: string) => {
    const i = ALL_RULES.findIndex((r) => r.code === code);
    return i < 0 ? ALL_RULES.length : i;
  };
  const issues = [...groups.values()].sort((a, b) => (a.severity === b.severity ? order(a.rule) - order(b.rule) || a.rule.localeCompare(b.rule) : a.severity === 'error' ? -1 : 1));
  const iso = (d: Date | null) => (d === null ? null : new Date(d).toISOString());
  return {
    id: b.id,
    state: b.state,
    submittedBy: b.submittedBy,
    createdAt: iso(b.createdAt)!,
    updatedAt: iso(b.updatedAt)!,
    loadedAt: iso(b.loadedAt),
    files: b.files,
    options: b.options,
    attempts: b.attempts,
    failureReason: b.failureReason,
    counts: {
      plotsRows: b.plotsRows,
      treesRows: b.treesRows,
      plotsLoaded: b.plotsLoaded,
      stemsLoaded: b.stemsLoaded,
      rowsSkipped: b.rowsSkipped,
      errors: b.nErrors,
      warnings: b.nWarnings,
    },
    progress: { bytesTotal: Number(b.bytesTotal), bytesRead: Number(b.bytesRead), rowsChecked: b.rowsChecked, rowsLoaded: b.rowsLoaded },
    issues,
    unresolvedNames: await listUnresolvedNames(db, id),
    computeProblems: (await listBatchProblems(db, id)).map(problemView),
  };
}

export const ISSUES_CSV_COLUMNS = ['severity', 'rule', 'file', 'line', 'column', 'value', 'message'] as const;

/** The stored issues of a batch as CSV text (errors only unless `severity` says otherwise), or null for an unknown batch. */
export async function batchIssuesCsv(db: Queryable, id: string, severity: 'error' | 'warning' | 'all' = 'error'): Promise<string | null> {
  if (!/^[0-9a-f-]{36}$/i.test(id) || !(await getBatch(db, id))) return null;
  const rows = await listBatchIssues(db, id, severity === 'all' ? undefined : severity);
  const lines = [ISSUES_CSV_COLUMNS.join(',')];
  for (const r of rows) lines.push([r.severity, r.rule, r.file, r.line, r.column, r.value, r.message].map(csvCell).join(','));
  return `${lines.join('\n')}\n`;
}
