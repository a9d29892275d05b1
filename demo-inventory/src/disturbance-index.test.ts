import { describe, expect, it } from 'vitest';
import {
  basalAreaM2, baWeightedFireDamage, disturbanceIndex, fireScore, loggingRemovedBaFrac, loggingScore, plotDisturbance,
  type IndexStem,
} from './disturbance-index';

const s = (dbhCm: number, status: IndexStem['status'], extra: Partial<IndexStem> = {}): IndexStem => ({
  dbhCm, status, stumpCause: status === 'stump' ? 'logged' : null, fireDamage: 0, inSubplot: false, ...extra,
});

// A plot worked by hand (computed): live 30 cm (fire 2) and 20 cm (fire 0), a logged stump of 50 cm cut
// surface (DBH 0.8 · 50 = 40 cm); a natural stump, a dead stem and a subplot stem must not count. Basal
// areas go as D², so f = 40² / (30² + 20² + 40²) = 1600 / 2900; w̄ = (900·2 + 400·0) / 1300.
const plot: IndexStem[] = [
  s(30, 'live', { fireDamage: 2 }),
  s(20, 'live'),
  s(50, 'stump'),
  s(50, 'stump', { stumpCause: 'natural' }),
  s(35, 'dead', { fireDamage: 3 }),
  s(8, 'live', { inSubplot: true, fireDamage: 3 }),
  s(9, 'stump', { inSubplot: true }),
];

describe('basalAreaM2', () => {
  it('is π (D/200)² m² (docs/methods.md#basal-area): 30 cm → 0.0706858 m² (computed)', () => {
    expect(basalAreaM2(30)).toBeCloseTo(0.07068583470577035, 14);
    expect(() => basalAreaM2(0)).toThrow(/basalAreaM2/);
  });
});

describe('disturbance index of a hand-worked plot', () => {
  it('finds the removed basal-area share of logged stumps on the main plot only', () => {
    expect(loggingRemovedBaFrac(plot)).toBeCloseTo(1600 / 2900, 12);
  });

  it('weights fire damage by basal area over live main-plot stems', () => {
    expect(baWeightedFireDamage(plot)).toBeCloseTo(1800 / 1300, 12);
  });

  it('combines the parts as the pipeline defines them (computed by hand, 1e-12)', () => {
    const d = plotDisturbance(plot, 2, 1);
    expect(d.loggingScore).toBeCloseTo(0.8333333333333333, 12); // mean(min(1, 0.5517/0.5) = 1, 2/3)
    expect(d.fireScore).toBeCloseTo(0.3974358974358974, 12); // mean(1.384615/3, 1/3)
    expect(d.disturbanceIndex).toBeCloseTo(0.8995726495726495, 12); // 1 − (1/6)(0.602564)
  });

  it('scales the removed share below saturation: f = 0.3077 → logging score (0.6154 + 1/3) / 2', () => {
    expect(loggingScore(400 / 1300, 1)).toBeCloseTo(0.47435897435897434, 12);
  });

  it('is 0 for an untouched plot and 1 when either agent is total', () => {
    expect(plotDisturbance([s(30, 'live'), s(12, 'live')], 0, 0).disturbanceIndex).toBe(0);
    expect(disturbanceIndex(1, 0)).toBe(1);
    expect(disturbanceIndex(0, 1)).toBe(1);
  });

  it('falls back to the field class alone when a measured part cannot be computed', () => {
    expect(loggingRemovedBaFrac([s(20, 'dead')])).toBeNull();
    expect(loggingScore(null, 3)).toBe(1);
    expect(fireScore(null, 0)).toBe(0);
  });

  it('rejects classes outside 0..3 and scores outside [0, 1], naming the function', () => {
    expect(() => loggingScore(0.1, 4)).toThrow(/loggingScore/);
    expect(() => fireScore(0.1, 1.5)).toThrow(/fireScore/);
    expect(() => disturbanceIndex(1.2, 0)).toThrow(/disturbanceIndex/);
  });
});
