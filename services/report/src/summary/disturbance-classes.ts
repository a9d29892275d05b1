import { RegionSummaryInputError } from './input';
import type { DisturbanceClass } from '@stemwise/core';

/** Our own documented defaults on disturbance_index (0–1), not a published scheme: change per protocol (docs/methods.md#disturbance-classes). */
export const DEFAULT_DISTURBANCE_CLASSES: readonly DisturbanceClass[] = [
  { name: 'very_low', below: 0.1 },
  { name: 'low', below: 0.3 },
  { name: 'intermediate', below: 0.6 },
  { name: 'high', below: null },
];

// Throws unless names are unique and non-empty, bounds finite and strictly increasing, and only the last class open.
export function assertDisturbanceClasses(classes: readonly DisturbanceClass[]): void {
  const fail = (detail: string): never => {
    throw new RegionSummaryInputError('BAD_OPTION', `disturbanceClasses: ${detail}`);
  };
  if (classes.length === 0) fail('needs at least one class');
  const names = new Set<string>();
  let previous = Number.NEGATIVE_INFINITY;
  classes.forEach((c, i) => {
    if (typeof c.name !== 'string' || c.name.trim() === '') fail(`class ${i} has no name`);
    if (names.has(c.name)) fail(`class '${c.name}' is listed twice`);
    names.add(c.name);
    const last = i === classes.length - 1;
    if (last && c.below !== null) fail(`the last class '${c.name}' must be open (below: null)`);
    if (!last) {
      if (typeof c.below !== 'number' || !Number.isFinite(c.below)) fail(`class '${c.name}' needs a finite upper bound`);
      if ((c.below as number) <= previous) fail(`bounds must increase; '${c.name}' has ${String(c.below)} after ${previous}`);
      previous = c.below as number;
    }
  });
}

// Index of the first class with value < below (the last class is open above; the first open below).
export function disturbanceClassIndex(value: number, classes: readonly DisturbanceClass[]): number {
  for (let i = 0; i < classes.length - 1; i++) if (value < (classes[i].below as number)) return i;
  return classes.length - 1;
}
