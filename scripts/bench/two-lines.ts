// `npm run bench -- --only two-lines [-- --reps 400]`: how much each difference between stemwise's two-lines
// test and the published procedure (docs/methods.md#where-it-differs-from-the-published-procedure) changes
// its outcome. Seeded simulated data sets (x ~ U(0, 1), y = f(x) + N(0, sd²)) for curves with and without a
// turn and several numbers of plots; per variant the share of sets where the test passes (a hump or U found)
// and the share where its outcome agrees with stemwise's default. The shape tested is the parabola's (b₂'s
// sign), as the verdict does, except in the last column, which passes when either shape passes.
// Not a speed benchmark: the figures are rates, printed as a markdown table for docs/methods.md.
import { parseArgs } from 'node:util';
import { fitPolynomial, PUBLISHED_TWO_LINES, twoLinesTest, type TwoLinesOptions } from '@stemwise/core/science';
import { simulateCurve } from '../../core/test/random-test-data';

const { values } = parseArgs({ options: { reps: { type: 'string', default: '400' } } });
const reps = Number(values.reps);

const CURVES: { name: string; f: (x: number) => number; sd: number }[] = [
  { name: 'flat', f: () => 10, sd: 1 },
  { name: 'straight rise', f: (x) => 10 + 2 * x, sd: 1 },
  { name: 'rise then level (saturating)', f: (x) => 10 + 3 * (1 - Math.exp(-6 * x)), sd: 1 },
  { name: 'rise, level off late', f: (x) => 10 + 3 * (1 - Math.exp(-3 * x)), sd: 1 },
  { name: 'hump, top at 0.5', f: (x) => 10 + 8 * x - 8 * x * x, sd: 1 },
  { name: 'weak hump, top at 0.5', f: (x) => 10 + 4 * x - 4 * x * x, sd: 1 },
  { name: 'tent, top at 0.75', f: (x) => (x < 0.75 ? 10 + (4 * x) / 0.75 : 14 - (8 * (x - 0.75)) / 0.25), sd: 1 },
];
const SIZES = [30, 100, 300];
const VARIANTS: { name: string; options: TwoLinesOptions }[] = [
  { name: 'default', options: {} },
  { name: 'spline', options: { smooth: 'spline' } },
  { name: 'whole flat region', options: { range: 'flat' } },
  { name: 'two regressions', options: { split: 'each' } },
  { name: 'normal p', options: { pValues: 'normal' } },
  { name: 'published', options: PUBLISHED_TWO_LINES },
];

const header = ['curve', 'n', ...VARIANTS.map((v) => v.name), 'published, either shape'];
console.log(`${reps} data sets per row; cells: pass rate % (agreement with default %)\n`);
console.log(`| ${header.join(' | ')} |`);
console.log(`|${header.map(() => '---').join('|')}|`);
let seed = 1;
for (const curve of CURVES) {
  for (const n of SIZES) {
    const passes = VARIANTS.map(() => 0);
    const agree = VARIANTS.map(() => 0);
    let either = 0;
    let eitherAgree = 0;
    for (let r = 0; r < reps; r++) {
      const pts = simulateCurve(n, curve.f, curve.sd, seed++);
      const x = pts.map((p) => p.x);
      const y = pts.map((p) => p.y);
      const b2 = fitPolynomial(x, y, 2).coefficients[2];
      const shape = b2 < 0 ? 'hump' : 'u_shape';
      const outcomes = VARIANTS.map((v) => twoLinesTest(x, y, shape, v.options).passes);
      outcomes.forEach((o, i) => {
        if (o) passes[i]++;
        if (o === outcomes[0]) agree[i]++;
      });
      const any = twoLinesTest(x, y, 'hump', PUBLISHED_TWO_LINES).passes || twoLinesTest(x, y, 'u_shape', PUBLISHED_TWO_LINES).passes;
      if (any) either++;
      if (any === outcomes[0]) eitherAgree++;
    }
    const pct = (k: number): string => ((100 * k) / reps).toFixed(1);
    const cells = VARIANTS.map((_, i) => (i === 0 ? pct(passes[0]) : `${pct(passes[i])} (${pct(agree[i])})`));
    console.log(`| ${curve.name} | ${n} | ${cells.join(' | ')} | ${pct(either)} (${pct(eitherAgree)}) |`);
  }
}
