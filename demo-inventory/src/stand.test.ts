import { describe, expect, it } from 'vitest';
import { plotDisturbance } from './disturbance-index';
import { Rng } from './random';
import { FOREST_TYPE_PROFILES } from './scenario';
import { drawHeight, drawStand, HEIGHT_CURVE } from './stand';

const base = { profile: FOREST_TYPE_PROFILES.moist, areaHa: 1, subplotAreaHa: 0.1, loggingShare: 0.5, measureHeights: false };

describe('drawStand', () => {
  it('leaves an undisturbed plot without logged stumps, fire damage or field classes', () => {
    const stand = drawStand({ ...base, disturbance: 0 }, new Rng(1));
    expect(stand.loggingClass).toBe(0);
    expect(stand.fireClass).toBe(0);
    expect(stand.stems.some((s) => s.stumpCause === 'logged')).toBe(false);
    expect(stand.stems.every((s) => s.fireDamage === 0)).toBe(true);
  });

  it('realises a disturbance index that tracks the latent d (mean |index − d| below 0.03)', () => {
    const rng = new Rng(2);
    let total = 0;
    let worst = 0;
    const n = 200;
    for (let i = 0; i < n; i++) {
      const d = rng.next();
      const stand = drawStand({ ...base, disturbance: d, loggingShare: rng.next() }, rng);
      const x = plotDisturbance(stand.stems, stand.loggingClass, stand.fireClass).disturbanceIndex;
      total += Math.abs(x - d);
      worst = Math.max(worst, Math.abs(x - d));
    }
    expect(total / n).toBeLessThan(0.03);
    expect(worst).toBeLessThan(0.2);
  });

  it('has a reverse-J diameter distribution: fewer live stems in each 10-cm class from 10 cm up to 60 cm', () => {
    const stand = drawStand({ ...base, disturbance: 0.1 }, new Rng(3));
    const classes = new Array<number>(5).fill(0);
    for (const s of stand.stems) {
      if (s.status !== 'live' || s.inSubplot || s.dbhCm >= 60) continue;
      classes[Math.floor((s.dbhCm - 10) / 10)] += 1;
    }
    for (let k = 1; k < classes.length; k++) expect(classes[k]).toBeLessThan(classes[k - 1]);
  });

  it('keeps main-plot stems at 10 cm and up, subplot stems from 5 to below 10 cm', () => {
    const stand = drawStand({ ...base, disturbance: 0.6 }, new Rng(4));
    for (const s of stand.stems) {
      if (s.inSubplot) expect(s.dbhCm >= 5 && s.dbhCm < 10).toBe(true);
      else expect(s.dbhCm).toBeGreaterThanOrEqual(10);
      expect(s.stumpCause !== null).toBe(s.status === 'stump');
    }
    expect(stand.stems.some((s) => s.inSubplot)).toBe(true);
  });

  it('gives heights to live stems only, and only when asked', () => {
    const without = drawStand({ ...base, disturbance: 0.2 }, new Rng(5));
    expect(without.stems.every((s) => s.heightM === null)).toBe(true);
    const withHeights = drawStand({ ...base, disturbance: 0.2, measureHeights: true }, new Rng(5));
    for (const s of withHeights.stems) expect(s.heightM !== null).toBe(s.status === 'live');
  });
});

describe('drawHeight', () => {
  it('follows the curve: median at 30 cm near exp(a + b ln 30 + c ln² 30) = 20.33 m (computed)', () => {
    const rng = new Rng(6);
    const hs = Array.from({ length: 2001 }, () => drawHeight(30, 0, rng)).sort((a, b) => a - b);
    const lnD = Math.log(30);
    const expected = Math.exp(HEIGHT_CURVE.a + HEIGHT_CURVE.b * lnD + HEIGHT_CURVE.c * lnD * lnD);
    expect(expected).toBeCloseTo(20.3298, 3);
    expect(Math.abs(hs[1000] - expected)).toBeLessThan(0.4);
  });

  it('stays within 1.3 m < H ≤ 55 m and slenderness 20 ≤ 100·H/D ≤ 110 (common practice)', () => {
    const rng = new Rng(7);
    for (const d of [5, 9.9, 10, 25, 60, 120, 250]) {
      for (let i = 0; i < 300; i++) {
        const h = drawHeight(d, 0.06, rng);
        expect(h).toBeGreaterThan(1.3);
        expect(h).toBeLessThanOrEqual(55);
        expect((100 * h) / d).toBeGreaterThanOrEqual(20);
        expect((100 * h) / d).toBeLessThanOrEqual(110);
      }
    }
  });
});
