// A validation rule: a stable code (lower_snake_case, prefixed by its family), a severity, and one
// sentence saying when it fires. Codes are a contract with uploaders and scripts: never rename one.

export type Severity = 'error' | 'warning';
export type RuleFamily = 'structure' | 'field' | 'row' | 'cross' | 'plausibility';

export interface Rule {
  readonly code: string;
  readonly family: RuleFamily;
  readonly severity: Severity;
  /** When the rule fires, for RULES.md and reports. */
  readonly summary: string;
}

/** Defines a rule; the code must start with its family (row and cross rules share `row_`/`cross_`). */
export function defineRule(family: RuleFamily, code: string, severity: Severity, summary: string): Rule {
  if (!/^[a-z]+(_[a-z0-9]+)+$/.test(code) || !code.startsWith(`${family}_`)) {
    throw new Error(`defineRule: ${code} is not a lower_snake_case code of the ${family} family`);
  }
  return Object.freeze({ code, family, severity, summary });
}

/** A value quoted for a message, shortened so one bad cell cannot flood a report. */
export function shown(value: string, max = 60): string {
  return JSON.stringify(value.length > max ? `${value.slice(0, max)}…` : value);
}
