import { describe, expect, it } from 'vitest';
import {
  normalCdf,
  normalQuantile,
  regularizedIncompleteBeta,
  studentTCdf,
  studentTQuantile,
  studentTTwoSidedP,
} from '@/domain/distributions';

/*
 * Upper critical values t(ν, α) with P(T > t) = α, to three decimals, from the table of the
 * NIST/SEMATECH e-Handbook of Statistical Methods (section 1.3.6.7.2), as reproduced at
 * https://pdfcoffee.com/student-t-distribution-table-pdf-free.html (read for this test).
 */
const NIST_T_TABLE: Array<[number, number, number]> = [
  [1, 0.1, 3.078],
  [1, 0.05, 6.314],
  [2, 0.05, 2.92],
  [6, 0.1, 1.44],
  [10, 0.025, 2.228],
  [13, 0.1, 1.35],
  [30, 0.005, 2.75],
  [100, 0.01, 2.364],
  [Infinity, 0.025, 1.96],
  [Infinity, 0.1, 1.282],
];

describe('Student t', () => {
  it.each(NIST_T_TABLE)('quantile for ν = %d, upper tail %d is %d (NIST e-Handbook)', (df, alpha, t) => {
    expect(studentTQuantile(1 - alpha, df)).toBeCloseTo(t, 3);
    expect(studentTCdf(-t, df)).toBeCloseTo(alpha, 3);
  });

  // Closed forms: ν = 1 is the Cauchy distribution, t = tan(π(p − ½));
  // ν = 2 has t = (2p − 1)/√(2p(1 − p)).
  it.each([0.6, 0.8, 0.9, 0.975, 0.999])('matches the closed forms for ν = 1 and 2 at p = %d', (p) => {
    expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 9);
    expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) / Math.sqrt(2 * p * (1 - p)), 9);
    expect(studentTCdf(Math.tan(Math.PI * (p - 0.5)), 1)).toBeCloseTo(p, 12);
  });

  it('is symmetric and handles the ends', () => {
    expect(studentTQuantile(0.5, 7)).toBe(0);
    expect(studentTQuantile(0.1, 7)).toBeCloseTo(-studentTQuantile(0.9, 7), 12);
    expect(studentTQuantile(0, 3)).toBe(-Infinity);
    expect(studentTQuantile(1, 3)).toBe(Infinity);
    expect(studentTQuantile(1.2, 3)).toBeNaN();
    expect(studentTQuantile(0.9, 0)).toBeNaN();
    expect(studentTTwoSidedP(0, 5)).toBeCloseTo(1, 12);
    expect(studentTTwoSidedP(2.228, 10)).toBeCloseTo(0.05, 3);
  });
});

describe('regularized incomplete beta', () => {
  // Identities: I_x(a, 1) = x^a, I_x(1, b) = 1 − (1 − x)^b, I_x(a, b) = 1 − I_{1−x}(b, a).
  it.each([
    [0.3, 2.5, 1],
    [0.9, 0.5, 1],
    [0.2, 1, 3.5],
    [0.75, 1, 0.4],
  ])('I_%d(%d, %d) matches its closed form', (x, a, b) => {
    const expected = b === 1 ? x ** a : 1 - (1 - x) ** b;
    expect(regularizedIncompleteBeta(x, a, b)).toBeCloseTo(expected, 13);
  });

  it('satisfies the reflection identity and domain checks', () => {
    for (const [x, a, b] of [[0.37, 4.2, 7.1], [0.9, 30, 2], [0.01, 0.5, 0.5]]) {
      expect(regularizedIncompleteBeta(x, a, b) + regularizedIncompleteBeta(1 - x, b, a)).toBeCloseTo(1, 13);
    }
    expect(regularizedIncompleteBeta(0, 2, 3)).toBe(0);
    expect(regularizedIncompleteBeta(1, 2, 3)).toBe(1);
    expect(regularizedIncompleteBeta(-0.1, 2, 3)).toBeNaN();
  });
});

describe('normal', () => {
  it('quantiles agree with the NIST e-Handbook table row for ν = ∞', () => {
    expect(normalQuantile(0.975)).toBeCloseTo(1.96, 3);
    expect(normalQuantile(0.995)).toBeCloseTo(2.576, 3);
    expect(normalCdf(normalQuantile(0.8))).toBeCloseTo(0.8, 12);
    expect(normalCdf(0)).toBeCloseTo(0.5, 15);
    expect(normalCdf(-40)).toBeGreaterThanOrEqual(0);
  });
});
