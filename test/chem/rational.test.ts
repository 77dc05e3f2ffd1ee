// Unit tests for exact rational arithmetic (server/src/chem/rational.ts).
// Expected values are worked by hand (`common practice` arithmetic).
import { describe, it, expect } from 'vitest';
import { gcd, lcm, Rational } from '../../server/src/chem/rational';
import { Random } from '../support/random';

const r = (n: number, d = 1): Rational => Rational.of(n, d);

describe('gcd and lcm', () => {
  it('computes gcd, always non-negative', () => {
    expect(gcd(12n, 18n)).toBe(6n); // common practice: 12 = 2·6, 18 = 3·6
    expect(gcd(-12n, 18n)).toBe(6n); // common practice
    expect(gcd(0n, 5n)).toBe(5n); // common practice: gcd(0, n) = |n|
    expect(gcd(0n, 0n)).toBe(0n); // common practice convention
    expect(gcd(17n, 5n)).toBe(1n); // common practice: coprime
  });

  it('computes lcm, zero when either is zero', () => {
    expect(lcm(4n, 6n)).toBe(12n); // common practice
    expect(lcm(-4n, 6n)).toBe(12n); // common practice
    expect(lcm(0n, 6n)).toBe(0n); // common practice convention
  });
});

describe('Rational', () => {
  it('normalises: gcd 1 and a positive denominator', () => {
    const x = r(6, -8);
    expect(x.numerator).toBe(-3n); // common practice: 6/-8 = -3/4
    expect(x.denominator).toBe(4n); // common practice
    expect(r(0, -5).denominator).toBe(1n); // common practice: 0 is 0/1
    expect(r(0, -5).numerator).toBe(0n); // common practice
    expect(r(10, 5).equals(r(2))).toBe(true); // common practice
  });

  it('adds, subtracts, multiplies, divides exactly', () => {
    expect(r(1, 2).add(r(1, 3)).toString()).toBe('5/6'); // common practice
    expect(r(1, 2).sub(r(1, 3)).toString()).toBe('1/6'); // common practice
    expect(r(2, 3).mul(r(9, 4)).toString()).toBe('3/2'); // common practice
    expect(r(2, 3).div(r(-4, 9)).toString()).toBe('-3/2'); // common practice
    expect(r(1, 3).neg().toString()).toBe('-1/3'); // common practice
    expect(r(-7, 2).abs().toString()).toBe('7/2'); // common practice
    // 0.1 + 0.2 is exactly 3/10 here, unlike in floating point (common practice)
    expect(r(1, 10).add(r(2, 10)).equals(r(3, 10))).toBe(true);
  });

  it('compares, signs and tests for zero and integers', () => {
    expect(r(1, 3).compare(r(1, 2))).toBe(-1); // common practice
    expect(r(2, 4).compare(r(1, 2))).toBe(0); // common practice
    expect(r(-1, 3).compare(r(-1, 2))).toBe(1); // common practice
    expect(r(-5, 3).sign()).toBe(-1); // common practice: negative
    expect(r(0).sign()).toBe(0); // common practice
    expect(r(5, 3).sign()).toBe(1); // common practice: positive
    expect(r(0, 7).isZero()).toBe(true);
    expect(r(1, 7).isZero()).toBe(false);
    expect(r(8, 4).isInteger()).toBe(true); // common practice: 8/4 = 2
    expect(r(8, 3).isInteger()).toBe(false);
  });

  it('converts to a number, also for huge numerators and denominators', () => {
    expect(r(1, 4).toNumber()).toBe(0.25); // common practice
    expect(r(-3, 2).toNumber()).toBe(-1.5); // common practice
    const huge = 10n ** 400n; // beyond the float range on its own
    const x = Rational.of(huge + 1n, huge * 3n);
    expect(x.toNumber()).toBeCloseTo(1 / 3, 12); // common practice: (10^400+1)/(3·10^400) ≈ 1/3
    expect(Number.isFinite(x.toNumber())).toBe(true);
  });

  it('prints integers without a denominator', () => {
    expect(r(4).toString()).toBe('4');
    expect(r(-4, 6).toString()).toBe('-2/3'); // common practice
  });

  it('rejects programming errors with a RangeError', () => {
    expect(() => r(1, 0)).toThrow(RangeError);
    expect(() => r(1).div(r(0))).toThrow(RangeError);
    expect(() => Rational.of(0.5)).toThrow(RangeError);
  });
});

describe('Rational.parse', () => {
  it.each([
    ['3', '3'], // common practice
    ['-2', '-2'], // common practice
    ['0.5', '1/2'], // common practice
    ['2.25', '9/4'], // common practice
    ['.5', '1/2'], // common practice
    ['1/2', '1/2'], // common practice
    ['6/4', '3/2'], // common practice: normalised
    ['-3/9', '-1/3'], // common practice
    [' 7 ', '7'], // surrounding space is ignored
    ['0.000', '0'], // common practice
  ])('parses %j as %s', (text, expected) => {
    expect(Rational.parse(text)?.toString()).toBe(expected);
  });

  it.each(['', 'abc', '1/0', '1/', '/2', '1.', '1.2.3', '1/2/3', '1e3', '0x10', '½', '- 1', '1 /2'])(
    'returns undefined for %j',
    (text) => {
      expect(Rational.parse(text)).toBeUndefined();
    },
  );
});

describe('Rational property tests', () => {
  // Property test: field laws hold exactly on seeded random fractions.
  it('satisfies (a + b) - b = a, (a · b) / b = a and commutativity', () => {
    const rng = new Random(20240611);
    const CASES = 300;
    for (let i = 0; i < CASES; i++) {
      const a = r(rng.int(-1000, 1000), rng.int(1, 500));
      let b = r(rng.int(-1000, 1000), rng.int(1, 500));
      if (b.isZero()) b = Rational.ONE;
      expect(a.add(b).sub(b).equals(a)).toBe(true);
      expect(a.mul(b).div(b).equals(a)).toBe(true);
      expect(a.add(b).equals(b.add(a))).toBe(true);
      expect(a.mul(b).equals(b.mul(a))).toBe(true);
      expect(gcd(a.numerator, a.denominator) === 1n || a.isZero()).toBe(true);
      expect(a.denominator > 0n).toBe(true);
      expect(a.toNumber()).toBeCloseTo(Number(a.numerator) / Number(a.denominator), 12); // common practice: same quotient in floating point
      expect(Rational.parse(a.toString())?.equals(a)).toBe(true);
    }
  });
});
