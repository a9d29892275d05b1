import { defineRule } from './rule';

// Rows: values of one row that contradict each other.

export const ROW = {
  stumpCauseMissing: defineRule('row', 'row_stump_cause_missing', 'error', 'A stump (status stump) has no stump_cause.'),
  stumpCauseNotStump: defineRule('row', 'row_stump_cause_not_stump', 'error', 'A stem that is not a stump has a stump_cause.'),
  subplotAreaTooLarge: defineRule('row', 'row_subplot_area_too_large', 'error', 'A plot\'s subplot_area_ha is not smaller than its area_ha.'),
} as const;

export const rowMessages = {
  stumpCauseMissing: () => 'status is stump but stump_cause is empty; give logged, natural or unknown',
  stumpCauseNotStump: (status: string, cause: string) => `stump_cause is ${cause} but status is ${status}; leave stump_cause empty unless the stem is a stump`,
  subplotAreaTooLarge: (sub: number, area: number) => `subplot_area_ha is ${sub} but area_ha is ${area}; the nested subplot must be smaller than the plot`,
};
