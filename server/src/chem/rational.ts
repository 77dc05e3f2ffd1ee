// Exact rational numbers on BigInt, for stoichiometry that must not round:
// formula counts (including fractional hydrate multipliers) and the exact
// Gaussian elimination behind the balance check.

/** Greatest common divisor of two integers; always >= 0 (gcd(0, 0) = 0). */
export function gcd(a: bigint, b: bigint): bigint {
  let x = a < 0n ? -a : a;
  let y = b < 0n ? -b : b;
  while (y !== 0n) {
    const r = x % y;
    x = y;
    y = r;
  }
  return x;
}

/** Least common multiple of two integers; always >= 0 (0 if either is 0). */
export function lcm(a: bigint, b: bigint): bigint {
  if (a === 0n || b === 0n) return 0n;
  const m = (a / gcd(a, b)) * b;
  return m < 0n ? -m : m;
}

/** Bits kept on each side of a fraction when converting a huge one to a float. */
const FLOAT_CONVERSION_BITS = 1000n;

const INTEGER_TEXT = /^([+-]?)(\d+)$/;
const DECIMAL_TEXT = /^([+-]?)(\d*)\.(\d+)$/;
const FRACTION_TEXT = /^([+-]?)(\d+)\/(\d+)$/;

/**
 * An immutable exact fraction. Always normalised: gcd(numerator, denominator)
 * is 1 and the denominator is positive, so equal values have equal fields.
 */
export class Rational {
  static readonly ZERO = new Rational(0n, 1n);
  static readonly ONE = new Rational(1n, 1n);

  private constructor(
    readonly numerator: bigint,
    readonly denominator: bigint,
  ) {}

  /**
   * n/d from integers. A `number` argument must be an integer, and d must not
   * be zero: both are programming errors (RangeError), never user input.
   */
  static of(n: bigint | number, d: bigint | number = 1n): Rational {
    const num = toBigInt(n);
    const den = toBigInt(d);
    if (den === 0n) throw new RangeError('Rational.of: zero denominator');
    const g = gcd(num, den);
    const sign = den < 0n ? -1n : 1n;
    return new Rational((sign * num) / g, (sign * den) / g);
  }

  /**
   * Parses integer (`3`, `-2`), decimal (`0.5`, `2.25`, `.5`) or fraction
   * (`1/2`) text, with optional surrounding white space. Returns undefined for
   * anything else, including a zero denominator.
   */
  static parse(text: string): Rational | undefined {
    const t = text.trim();
    let m = INTEGER_TEXT.exec(t);
    if (m) return Rational.of(signed(m[1], BigInt(m[2])));
    m = DECIMAL_TEXT.exec(t);
    if (m) {
      const whole = m[2] === '' ? 0n : BigInt(m[2]);
      const scale = 10n ** BigInt(m[3].length);
      return Rational.of(signed(m[1], whole * scale + BigInt(m[3])), scale);
    }
    m = FRACTION_TEXT.exec(t);
    if (m) {
      const den = BigInt(m[3]);
      if (den === 0n) return undefined;
      return Rational.of(signed(m[1], BigInt(m[2])), den);
    }
    return undefined;
  }

  add(other: Rational): Rational {
    return Rational.of(
      this.numerator * other.denominator + other.numerator * this.denominator,
      this.denominator * other.denominator,
    );
  }

  sub(other: Rational): Rational {
    return this.add(other.neg());
  }

  mul(other: Rational): Rational {
    return Rational.of(this.numerator * other.numerator, this.denominator * other.denominator);
  }

  /** Division; dividing by zero is a programming error (RangeError). */
  div(other: Rational): Rational {
    if (other.isZero()) throw new RangeError('Rational.div: division by zero');
    return Rational.of(this.numerator * other.denominator, this.denominator * other.numerator);
  }

  neg(): Rational {
    return new Rational(-this.numerator, this.denominator);
  }

  abs(): Rational {
    return this.numerator < 0n ? this.neg() : this;
  }

  /** -1, 0 or 1 as this is less than, equal to or greater than other. */
  compare(other: Rational): -1 | 0 | 1 {
    const d = this.numerator * other.denominator - other.numerator * this.denominator;
    return d < 0n ? -1 : d > 0n ? 1 : 0;
  }

  equals(other: Rational): boolean {
    return this.numerator === other.numerator && this.denominator === other.denominator;
  }

  isZero(): boolean {
    return this.numerator === 0n;
  }

  isInteger(): boolean {
    return this.denominator === 1n;
  }

  sign(): -1 | 0 | 1 {
    return this.numerator < 0n ? -1 : this.numerator > 0n ? 1 : 0;
  }

  /** Nearest float; finite whenever the value is within the float range. */
  toNumber(): number {
    let num = this.numerator;
    let den = this.denominator;
    const excess = BigInt(Math.max(bitLength(num), bitLength(den))) - FLOAT_CONVERSION_BITS;
    if (excess > 0n) {
      // Both parts too big for a float: drop the same number of low bits from each.
      num >>= excess;
      den >>= excess;
      if (den === 0n) return num < 0n ? -Infinity : Infinity;
    }
    return Number(num) / Number(den);
  }

  /** `3`, `-1/2`. */
  toString(): string {
    return this.denominator === 1n ? `${this.numerator}` : `${this.numerator}/${this.denominator}`;
  }
}

function toBigInt(x: bigint | number): bigint {
  if (typeof x === 'bigint') return x;
  if (!Number.isSafeInteger(x)) throw new RangeError(`Rational.of: ${x} is not a safe integer`);
  return BigInt(x);
}

function signed(sign: string, magnitude: bigint): bigint {
  return sign === '-' ? -magnitude : magnitude;
}

function bitLength(x: bigint): number {
  return (x < 0n ? -x : x).toString(2).length;
}
