// Drawing a plot's tree community: how many species and how their stems split (a Chinese
// restaurant process with the plot's target alpha), and which species of the flora they are.

import { GUILD_RESPONSE } from './planted-curves';
import type { Rng } from './random';
import type { ForestType } from './scenario';
import type { Flora } from './species';

export interface Partition {
  /** Species label (0 … species − 1, in order of first appearance) of each individual. */
  readonly labels: Int32Array;
  readonly species: number;
}

// Chinese restaurant process (Ewens 1972 sampling formula): individual i + 1 founds a new species with probability θ/(θ + i), else joins the species of a uniformly chosen earlier individual; E[S] = Σᵢ θ/(θ + i) ≈ θ ln(1 + n/θ), Fisher's log-series relation.
export function crpPartition(n: number, theta: number, rng: Rng): Partition {
  if (!(Number.isInteger(n) && n >= 0)) throw new RangeError(`crpPartition: n must be an integer >= 0, got ${n}`);
  if (!(theta > 0 && Number.isFinite(theta))) throw new RangeError(`crpPartition: theta must be a finite number > 0, got ${theta}`);
  const labels = new Int32Array(n);
  let species = 0;
  for (let i = 0; i < n; i++) {
    if (rng.next() * (theta + i) < theta) {
      labels[i] = species;
      species += 1;
    } else {
      labels[i] = labels[rng.int(i)];
    }
  }
  return { labels, species };
}

/**
 * The species a plot can draw from: those of its forest type, each weighted by its regional
 * abundance times exp(g · x) for its guild's response g to the plot's disturbance index x.
 */
export class SpeciesPool {
  private readonly members: Int32Array;
  private readonly cumulative: Float64Array;
  private readonly total: number;
  private readonly floraSize: number;

  constructor(flora: Flora, type: ForestType, disturbance: number) {
    const members: number[] = [];
    const cumulative: number[] = [];
    let total = 0;
    for (const s of flora.species) {
      const w = s.weights[type];
      if (!(w > 0)) continue;
      total += w * Math.exp(GUILD_RESPONSE[s.guild] * disturbance);
      members.push(s.index);
      cumulative.push(total);
    }
    if (members.length === 0) throw new Error(`SpeciesPool: no species of forest type ${type}`);
    this.members = Int32Array.from(members);
    this.cumulative = Float64Array.from(cumulative);
    this.total = total;
    this.floraSize = flora.species.length;
  }

  get size(): number {
    return this.members.length;
  }

  /** One species index, drawn by weight (with replacement). */
  draw(rng: Rng): number {
    return this.members[this.position(rng.next() * this.total)];
  }

  /**
   * `k` different species indices in order of drawing: regionally common species tend to come
   * first and so to found the plot's abundant species. Past the pool's size, species of other
   * forest types fill in (rare strays), so any k up to the flora's size works.
   */
  drawDistinct(k: number, rng: Rng): number[] {
    if (!(Number.isInteger(k) && k >= 0 && k <= this.floraSize)) {
      throw new RangeError(`SpeciesPool.drawDistinct: k must be an integer in [0, ${this.floraSize}], got ${k}`);
    }
    const used = new Uint8Array(this.floraSize);
    const out: number[] = [];
    while (out.length < k && out.length < this.members.length) {
      let pick = -1;
      for (let attempt = 0; attempt < 40 && pick < 0; attempt++) {
        const candidate = this.draw(rng);
        if (used[candidate] === 0) pick = candidate;
      }
      if (pick < 0) pick = this.drawUnused(used, rng);
      used[pick] = 1;
      out.push(pick);
    }
    for (let s = rng.int(this.floraSize); out.length < k; s = (s + 1) % this.floraSize) {
      if (used[s] === 0) {
        used[s] = 1;
        out.push(s);
      }
    }
    return out;
  }

  // Weighted draw among pool members not yet used: a linear pass, only after repeated rejections.
  private drawUnused(used: Uint8Array, rng: Rng): number {
    let free = 0;
    let previous = 0;
    const weights = new Float64Array(this.members.length);
    for (let i = 0; i < this.members.length; i++) {
      const w = this.cumulative[i] - previous;
      previous = this.cumulative[i];
      if (used[this.members[i]] === 0) {
        weights[i] = w;
        free += w;
      }
    }
    let u = rng.next() * free;
    for (let i = 0; i < weights.length; i++) {
      if (weights[i] === 0) continue;
      u -= weights[i];
      if (u < 0) return this.members[i];
    }
    for (let i = weights.length - 1; i >= 0; i--) if (weights[i] > 0) return this.members[i];
    throw new Error('SpeciesPool.drawUnused: every member is already used');
  }

  // Binary search of the first cumulative weight above u.
  private position(u: number): number {
    let lo = 0;
    let hi = this.cumulative.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (this.cumulative[mid] > u) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  }
}
