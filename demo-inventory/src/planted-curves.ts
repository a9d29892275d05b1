// The planted signal: target Fisher's alpha of a plot's live stems as a function of its realised
// disturbance index, one curve per forest type. Invented for the demo, taken from no study.

import type { Guild } from './species';
import type { ForestType } from './scenario';

export type PlantedShape = 'hump' | 'decreasing' | 'none';

export interface PlantedCurve {
  readonly shape: PlantedShape;
  /** The curve in words a reader can check, x = disturbance_index. */
  readonly formula: string;
  readonly parameters: Readonly<Record<string, number>>;
  /** Disturbance index of the maximum (hump only). */
  readonly vertex: number | null;
  /** SD of the log-normal plot-to-plot noise on the target alpha. */
  readonly noiseSdLog: number;
}

export const PLANTED_CURVES: Readonly<Record<ForestType, PlantedCurve>> = {
  wet: {
    shape: 'hump',
    formula: 'alpha = peak - k * (x - vertex)^2',
    parameters: { peak: 58, k: 110, vertex: 0.45 },
    vertex: 0.45,
    noiseSdLog: 0.1,
  },
  moist: {
    shape: 'decreasing',
    formula: 'alpha = a - b * x',
    parameters: { a: 46, b: 28 },
    vertex: null,
    noiseSdLog: 0.1,
  },
  dry: {
    shape: 'none',
    formula: 'alpha = a',
    parameters: { a: 13 },
    vertex: null,
    noiseSdLog: 0.12,
  },
};

// Expected target alpha at disturbance index x: the planted curve of the forest type, without noise (demo invention).
export function plantedAlpha(type: ForestType, x: number): number {
  if (!(x >= 0 && x <= 1)) throw new RangeError(`plantedAlpha: disturbance index must be in [0, 1], got ${x}`);
  const p = PLANTED_CURVES[type].parameters;
  switch (type) {
    case 'wet':
      return p.peak - p.k * (x - p.vertex) ** 2;
    case 'moist':
      return p.a - p.b * x;
    case 'dry':
      return p.a;
  }
}

/**
 * How species of each guild become more or less likely as disturbance grows: a species' weight is
 * multiplied by exp(g · x). Pioneers gain, shade-tolerant species lose (demo invention).
 */
export const GUILD_RESPONSE: Readonly<Record<Guild, number>> = {
  pioneer: 2.2,
  light_demander: 0.5,
  shade_tolerant: -1.2,
};
