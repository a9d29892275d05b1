import { CROSS } from './cross';
import { FIELD } from './fields';
import { PLAUSIBILITY } from './plausibility';
import type { Rule } from './rule';
import { ROW } from './rows';
import { STRUCTURE } from './structure';

/** Every rule, in the order of RULES.md: structure, field, row, cross, plausibility. */
export const ALL_RULES: readonly Rule[] = [
  ...Object.values(STRUCTURE),
  ...Object.values(FIELD),
  ...Object.values(ROW),
  ...Object.values(CROSS),
  ...Object.values(PLAUSIBILITY),
];

export function ruleByCode(code: string): Rule | undefined {
  return ALL_RULES.find((r) => r.code === code);
}
