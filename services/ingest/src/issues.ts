import type { BatchIssueRow } from '@stemwise/db';
import { OMITTED_MARK, type Rule } from '@stemwise/core';

/** Text the database can store: PostgreSQL text refuses U+0000, shown instead as ␀ (U+2400). */
function storable(s: string | null): string | null {
  return s !== null && s.includes('\0') ? s.replace(/\0/g, '\u2400') : s;
}

/**
 * Every issue of a batch is counted; the first `capPerRule` of each rule are kept with their line,
 * column and value. A rule with more gets one extra row (column `*`, value = how many were left out),
 * so a report can give exact totals without storing millions of rows.
 */
export class IssueLog {
  private readonly stored: BatchIssueRow[] = [];
  private readonly counts = new Map<string, { rule: Rule; file: string; n: number }>();
  errors = 0;
  warnings = 0;

  constructor(private readonly capPerRule = 1000) {}

  add(rule: Rule, file: string, line: number | null, column: string | null, value: string | null, message: string): void {
    if (rule.severity === 'error') this.errors++;
    else this.warnings++;
    const key = `${rule.code}\u0000${file}`;
    let c = this.counts.get(key);
    if (!c) this.counts.set(key, (c = { rule, file, n: 0 }));
    c.n++;
    if (c.n <= this.capPerRule) {
      const v = value === null ? null : value.length > 200 ? `${value.slice(0, 200)}…` : value;
      this.stored.push({ severity: rule.severity, rule: rule.code, file, line, column: storable(column), value: storable(v), message: storable(message)! });
    }
  }

  count(code: string): number {
    let n = 0;
    for (const c of this.counts.values()) if (c.rule.code === code) n += c.n;
    return n;
  }

  /** Rows to store: the kept issues plus one "left out" row per capped rule and file. */
  rows(): BatchIssueRow[] {
    const out = this.stored.slice();
    for (const c of this.counts.values()) {
      const omitted = c.n - this.capPerRule;
      if (omitted > 0) {
        out.push({
          severity: c.rule.severity,
          rule: c.rule.code,
          file: c.file,
          line: null,
          column: OMITTED_MARK,
          value: String(omitted),
          message: `${omitted.toLocaleString('en-US')} more rows break this rule; only the first ${this.capPerRule.toLocaleString('en-US')} are listed`,
        });
      }
    }
    return out;
  }
}
