// Seeded simulated data for the statistical behaviour tests (test support; not used by the product).
import { createRng, type Rng } from '../src/science/random';

// Standard normal deviate by the Box–Muller transform z = √(−2 ln u)·cos(2πv) (Box & Muller 1958, Ann. Math. Stat. 29:610–611).
export function normalDeviate(rng: Rng): number {
  const u = 1 - rng.next();
  const v = rng.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

// n points with x ~ U(0, 1) and y = f(x) + sd·N(0, 1), reproducible from the seed.
export function simulateCurve(n: number, f: (x: number) => number, sd: number, seed: number): { x: number; y: number }[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const x = rng.next();
    return { x, y: f(x) + sd * normalDeviate(rng) };
  });
}
