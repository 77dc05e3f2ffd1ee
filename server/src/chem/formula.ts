// Chemical formula parser: turns one formula's text (`CuSO4·5H2O`,
// `[Fe(CN)6]^4-`, `SO₄²⁻`, `e-`) into an element composition, a charge and a
// molar mass. Problems come back as data with exact offsets into the text;
// this module never throws on user input.
import { elementBySymbol, isElementSymbol, suggestSymbols } from './elements';
import { Rational } from './rational';

export interface FormulaProblem {
  code: 'syntax' | 'unknown-element' | 'ambiguous-charge';
  severity: 'error' | 'warning';
  message: string;
  /** Offset of the first character the problem is about (UTF-16 units into the formula text). */
  start: number;
  /** Offset just past the last character the problem is about. */
  end: number;
  /** Suggested rewrites; each replacement is the whole new formula text. */
  fixes?: { title: string; replacement: string }[];
}

export interface Formula {
  text: string;
  /** Element symbol (D and T kept as their own keys) -> count, in order of first appearance. */
  composition: ReadonlyMap<string, Rational>;
  charge: number;
  /** g/mol: sum of count × atomic weight; ion charges do not change it. */
  molarMass: number;
  isElectron: boolean;
}

export type FormulaResult =
  | { ok: true; formula: Formula; problems: FormulaProblem[] /* warnings only */ }
  | { ok: false; problems: FormulaProblem[] };

/** CODATA 2018 electron molar mass, g/mol. */
export const ELECTRON_MOLAR_MASS = 5.48579909065e-4;

/** Subscripts, multipliers and charge sizes above this are rejected as absurd. */
export const MAX_COUNT = 1_000_000;

/** Deepest allowed nesting of `()`/`[]` groups; keeps counts finite and the parser's stack small. */
export const MAX_GROUP_DEPTH = 12;

/** Most did-you-mean symbols offered for an unknown one. */
const MAX_SUGGESTIONS = 3;

const ELECTRON_TEXTS: ReadonlySet<string> = new Set(['e-', 'e−', 'e^-', 'e^−', 'e⁻']);
const HYDRATE_SEPARATORS: ReadonlySet<string> = new Set(['·', '•', '*', '.']);
const CLOSER_OF: Readonly<Record<string, string>> = { '(': ')', '[': ']' };
const OPENER_OF: Readonly<Record<string, string>> = { ')': '(', ']': '[' };
const SUBSCRIPT_DIGITS = '₀₁₂₃₄₅₆₇₈₉';
const SUPERSCRIPT_DIGITS = '⁰¹²³⁴⁵⁶⁷⁸⁹';
const SUPERSCRIPT_PLUS = '⁺';
const SUPERSCRIPT_MINUS = '⁻';
/** ASCII minus and U+2212 MINUS SIGN both mean a negative charge. */
const MINUS_SIGNS = '-−';
const PLUS_SIGN = '+';

const CARET_CHARGE = /^\^(\d*)([+\-−])$/;
const CARET_CHARGE_PREFIX = /^\^\d*[+\-−]/;
const SIGN_THEN_SIZE_AT_END = /^\^?([+\-−])(\d+)$/;
const MULTIPLIER_TEXT = /^\d+(?:\.\d+|\/\d+)?/;

/** `3` -> `^3+`, `-1` -> `^-`, `0` -> ``. */
export function formatFormulaCharge(charge: number): string {
  if (charge === 0) return '';
  const size = Math.abs(charge);
  return `^${size === 1 ? '' : size}${charge > 0 ? '+' : '-'}`;
}

/**
 * Parses one formula (no phase, no reaction coefficient):
 *   formula  := electron | part (separator multiplier? part)* charge?
 *   part     := ((Element | '(' part ')' | '[' part ']') subscript?)+
 *   separator: `·` `•` `*` `.`; multiplier: `5`, `0.5` or `1/2`
 *   charge   := `^3+` | `^-` | `+`, `++`, `-` | `³⁺`, `⁻`
 * Digits followed by one bare sign at the end (`Fe3+`) are ambiguous and come
 * back as an 'ambiguous-charge' warning with both rewrites, never a guess.
 * Stops at the first problem; never throws.
 */
export function parseFormula(text: string): FormulaResult {
  if (text.length === 0) {
    return fail(syntax('empty formula: expected an element symbol such as `H` or a group such as `(OH)`', 0, 0));
  }
  if (ELECTRON_TEXTS.has(text)) {
    const formula: Formula = {
      text,
      composition: new Map(),
      charge: -1,
      molarMass: ELECTRON_MOLAR_MASS,
      isElectron: true,
    };
    return { ok: true, formula, problems: [] };
  }

  const scan = scanCharge(text);
  if (scan.kind === 'problem') return fail(scan.problem);

  if (scan.kind === 'ambiguous') {
    // Parse with every digit as a subscript first: a broken body is reported as such.
    const body = new BodyParser(text, text.length - 1).parse();
    if (!body.ok) return fail(body.problem);
    return fail(ambiguityProblem(text, scan.digitsStart, scan.sign));
  }

  if (scan.bodyEnd === 0) {
    return fail(syntax('a charge needs a formula in front of it, e.g. `Na+` or `SO4^2-`', 0, text.length));
  }
  const body = new BodyParser(text, scan.bodyEnd).parse();
  if (!body.ok) return fail(body.problem);

  let molarMass = 0;
  for (const [symbol, count] of body.composition) {
    // The parser only admits known symbols, so the lookup always succeeds.
    molarMass += count.toNumber() * (elementBySymbol(symbol)?.atomicWeight ?? Number.NaN);
  }
  if (!Number.isFinite(molarMass)) {
    return fail(syntax('formula gives no finite molar mass (it is too large)', 0, text.length));
  }
  const formula: Formula = { text, composition: body.composition, charge: scan.charge, molarMass, isElectron: false };
  return { ok: true, formula, problems: [] };
}

// ---------------------------------------------------------------------------
// Charge suffix

type ChargeScan =
  | { kind: 'charge'; bodyEnd: number; charge: number }
  /** Digits directly followed by one bare sign at the end, e.g. `Fe3+`. */
  | { kind: 'ambiguous'; digitsStart: number; sign: 1 | -1 }
  | { kind: 'problem'; problem: FormulaProblem };

/**
 * Finds the charge written at the end of the text, if any. Charges anywhere
 * else are left in the body, where the body parser reports them.
 */
function scanCharge(text: string): ChargeScan {
  const n = text.length;

  const caret = text.lastIndexOf('^');
  if (caret >= 0) {
    const m = CARET_CHARGE.exec(text.slice(caret));
    if (m) return checkedCharge(text, caret, m[1] === '' ? 1 : Number(m[1]), signOf(m[2]), caret);
  }

  const last = text[n - 1];
  if (last === SUPERSCRIPT_PLUS || last === SUPERSCRIPT_MINUS) {
    let signStart = n;
    while (signStart > 0 && isSuperscriptSign(text[signStart - 1])) signStart--;
    let digitsStart = signStart;
    while (digitsStart > 0 && SUPERSCRIPT_DIGITS.includes(text[digitsStart - 1])) digitsStart--;
    const signs = text.slice(signStart);
    const sign = signs[0] === SUPERSCRIPT_PLUS ? 1 : -1;
    if (!sameSigns(signs)) {
      return problem(syntax(`mixed charge signs \`${signs}\`: a charge has one sign`, signStart, n));
    }
    if (digitsStart < signStart) {
      if (signs.length > 1) {
        return problem(
          syntax('write a superscript charge as digits then one sign, e.g. `Fe³⁺`', digitsStart, n),
        );
      }
      const size = Number(toAsciiDigits(text.slice(digitsStart, signStart), SUPERSCRIPT_DIGITS));
      return checkedCharge(text, digitsStart, size, sign, digitsStart);
    }
    return checkedCharge(text, signStart, signs.length, sign, signStart);
  }

  if (isBareSign(last)) {
    let signStart = n;
    while (signStart > 0 && isBareSign(text[signStart - 1])) signStart--;
    const signs = text.slice(signStart);
    const sign = signOf(signs[0]);
    if (!sameSigns(signs)) {
      return problem(syntax(`mixed charge signs \`${signs}\`: a charge has one sign`, signStart, n));
    }
    if (signs.length === 1 && signStart > 0 && isAsciiDigit(text[signStart - 1])) {
      let digitsStart = signStart;
      while (digitsStart > 0 && isAsciiDigit(text[digitsStart - 1])) digitsStart--;
      // A number with nothing before it is a stray number, not an ambiguous charge.
      if (digitsStart > 0) return { kind: 'ambiguous', digitsStart, sign };
    }
    return checkedCharge(text, signStart, signs.length, sign, signStart);
  }

  return { kind: 'charge', bodyEnd: n, charge: 0 };
}

function checkedCharge(text: string, bodyEnd: number, size: number, sign: 1 | -1, chargeStart: number): ChargeScan {
  if (size === 0) {
    return problem(syntax('a charge of zero is written by leaving the charge out', chargeStart, text.length));
  }
  if (size > MAX_COUNT) {
    return problem(
      syntax(`charge ${size} is too large to be meaningful (the limit is ${MAX_COUNT})`, chargeStart, text.length),
    );
  }
  return { kind: 'charge', bodyEnd, charge: sign * size };
}

/**
 * `Fe3+` may mean Fe with charge 3+ or Fe3 with charge 1+. Reading one: the
 * shortest run of trailing digits that gives a nonzero charge and leaves a
 * nonzero (or no) subscript, normally exactly one digit (`SO42-` -> `SO4^2-`).
 * Reading two: all digits are the subscript, charge 1 (`SO42^-`).
 */
function ambiguityProblem(text: string, digitsStart: number, sign: 1 | -1): FormulaProblem {
  const signPos = text.length - 1;
  const digits = text.slice(digitsStart, signPos);
  const prefix = text.slice(0, digitsStart);
  let chargeDigits = digits.length;
  for (let k = 1; k < digits.length; k++) {
    const rest = digits.slice(0, digits.length - k);
    if (Number(digits.slice(-k)) !== 0 && Number(rest) !== 0) {
      chargeDigits = k;
      break;
    }
  }
  const chargeSize = Number(digits.slice(digits.length - chargeDigits));
  const speciesA = prefix + digits.slice(0, digits.length - chargeDigits);
  const textA = speciesA + formatFormulaCharge(sign * chargeSize);
  const speciesB = prefix + digits;
  const textB = speciesB + formatFormulaCharge(sign);
  const describeA = `${speciesA} with charge ${chargeSize}${sign > 0 ? '+' : '-'}`;
  const describeB = `${speciesB} with charge 1${sign > 0 ? '+' : '-'}`;
  return {
    code: 'ambiguous-charge',
    severity: 'warning',
    message: `\`${text}\` is ambiguous: ${describeA} (write \`${textA}\`) or ${describeB} (write \`${textB}\`)`,
    start: digitsStart,
    end: text.length,
    fixes: [
      { title: `Write \`${textA}\` (${describeA})`, replacement: textA },
      { title: `Write \`${textB}\` (${describeB})`, replacement: textB },
    ],
  };
}

// ---------------------------------------------------------------------------
// Body: parts, groups, elements, subscripts

type Counts = Map<string, bigint>;
type BodyResult = { ok: true; composition: Map<string, Rational> } | { ok: false; problem: FormulaProblem };

/** Recursive-descent parser over text[0, end); stops at the first problem. */
class BodyParser {
  private pos = 0;
  private problem: FormulaProblem | undefined;

  constructor(
    private readonly text: string,
    private readonly end: number,
  ) {}

  parse(): BodyResult {
    const composition = this.parseParts();
    if (composition === undefined) {
      return { ok: false, problem: this.problem ?? syntax('invalid formula', 0, this.text.length) };
    }
    return { ok: true, composition };
  }

  /** part (separator multiplier? part)* */
  private parseParts(): Map<string, Rational> | undefined {
    const total = new Map<string, Rational>();
    let first = true;
    for (;;) {
      const partStart = this.pos;
      let multiplier = Rational.ONE;
      if (isAsciiDigit(this.peek())) {
        const m = this.readMultiplier(first);
        if (m === undefined) return undefined;
        multiplier = m;
      }
      const counts = this.parseUnits(0);
      if (counts === undefined) return undefined;
      if (!this.atEnd() && !HYDRATE_SEPARATORS.has(this.peek())) return this.unexpected(undefined);
      if (counts.size === 0) {
        // Only a separator or the end can follow here; point at the multiplier if there is one.
        if (this.pos > partStart) {
          const written = this.text.slice(partStart, this.pos);
          return this.fail(
            syntax(`expected an element symbol or a group after the multiplier \`${written}\``, partStart, this.pos),
          );
        }
        return this.fail(
          syntax(`expected an element symbol or a group before \`${this.peek()}\``, this.pos, this.pos + 1),
        );
      }
      for (const [symbol, count] of counts) {
        const add = multiplier.mul(Rational.of(count));
        const before = total.get(symbol);
        total.set(symbol, before === undefined ? add : before.add(add));
      }
      if (this.atEnd()) return total;
      const separator = this.peek();
      this.pos++;
      first = false;
      if (this.atEnd()) {
        return this.fail(
          syntax(`nothing after the separator \`${separator}\`: expected a part such as \`5H2O\``, this.pos - 1, this.pos),
        );
      }
    }
  }

  /** A number in front of a part: `5`, `0.5`, `1/2`. Only allowed after a separator. */
  private readMultiplier(first: boolean): Rational | undefined {
    const start = this.pos;
    const match = MULTIPLIER_TEXT.exec(this.text.slice(start, this.end));
    const numberText = match ? match[0] : '';
    this.pos = start + numberText.length;
    if (first) {
      return this.fail(
        syntax(
          `stray number \`${numberText}\` at the start of the formula: a coefficient belongs to the reaction, not to the formula`,
          start,
          this.pos,
        ),
      );
    }
    const value = Rational.parse(numberText);
    if (value === undefined) {
      return this.fail(syntax(`\`${numberText}\` is not a valid multiplier: the denominator is zero`, start, this.pos));
    }
    if (value.isZero()) {
      return this.fail(syntax(`zero multiplier \`${numberText}\`: leave the part out instead`, start, this.pos));
    }
    if (value.compare(Rational.of(MAX_COUNT)) > 0) {
      return this.fail(
        syntax(`multiplier \`${numberText}\` is too large to be meaningful (the limit is ${MAX_COUNT})`, start, this.pos),
      );
    }
    return value;
  }

  /** (element | group) subscript?, repeated; stops at anything else without consuming it. */
  private parseUnits(depth: number): Counts | undefined {
    const counts: Counts = new Map();
    while (!this.atEnd()) {
      const c = this.peek();
      let unit: Counts | undefined;
      if (isUpper(c)) unit = this.parseElement();
      else if (c in CLOSER_OF) unit = this.parseGroup(depth);
      else break;
      if (unit === undefined) return undefined;
      const subscript = this.parseSubscript();
      if (subscript === undefined) return undefined;
      for (const [symbol, count] of unit) counts.set(symbol, (counts.get(symbol) ?? 0n) + count * subscript);
    }
    return counts;
  }

  private parseElement(): Counts | undefined {
    const start = this.pos;
    this.pos++;
    while (!this.atEnd() && isLower(this.peek())) this.pos++;
    const symbol = this.text.slice(start, this.pos);
    if (!isElementSymbol(symbol)) return this.fail(this.unknownElement(symbol, start, this.pos));
    return new Map([[symbol, 1n]]);
  }

  private parseGroup(depth: number): Counts | undefined {
    const openPos = this.pos;
    const opener = this.peek();
    const closer = CLOSER_OF[opener];
    if (depth >= MAX_GROUP_DEPTH) {
      return this.fail(syntax(`groups are nested too deeply (more than ${MAX_GROUP_DEPTH} levels)`, openPos, openPos + 1));
    }
    this.pos++;
    const inner = this.parseUnits(depth + 1);
    if (inner === undefined) return undefined;
    if (this.atEnd()) {
      return this.fail(syntax(`\`${opener}\` is never closed: expected \`${closer}\``, openPos, openPos + 1));
    }
    if (this.peek() !== closer) return this.unexpected({ opener, openPos });
    if (inner.size === 0) {
      return this.fail(syntax(`empty group \`${opener}${closer}\``, openPos, this.pos + 1));
    }
    this.pos++;
    return inner;
  }

  /** ASCII or Unicode subscript digits after an element or group; 1 when absent. */
  private parseSubscript(): bigint | undefined {
    const start = this.pos;
    let digits = '';
    if (isAsciiDigit(this.peek())) {
      while (!this.atEnd() && isAsciiDigit(this.peek())) this.pos++;
      digits = this.text.slice(start, this.pos);
    } else if (isSubscriptDigit(this.peek())) {
      while (!this.atEnd() && isSubscriptDigit(this.peek())) this.pos++;
      digits = toAsciiDigits(this.text.slice(start, this.pos), SUBSCRIPT_DIGITS);
    } else {
      return 1n;
    }
    const value = BigInt(digits);
    const written = this.text.slice(start, this.pos);
    if (value === 0n) {
      return this.fail(syntax(`zero subscript \`${written}\`: leave the element or group out instead`, start, this.pos));
    }
    if (value > BigInt(MAX_COUNT)) {
      return this.fail(
        syntax(`subscript \`${written}\` is too large to be meaningful (the limit is ${MAX_COUNT})`, start, this.pos),
      );
    }
    return value;
  }

  /** Reports the character at pos, which cannot appear there; `group` is the innermost open group. */
  private unexpected(group: { opener: string; openPos: number } | undefined): undefined {
    const start = this.pos;
    const c = this.peek();
    const text = this.text;

    if (isLower(c)) return this.fail(this.lowercaseStart());
    if (isAsciiDigit(c) || isSubscriptDigit(c)) {
      let end = start;
      while (end < this.end && (isAsciiDigit(text[end]) || isSubscriptDigit(text[end]))) end++;
      return this.fail(
        syntax(
          `stray number \`${text.slice(start, end)}\`: a number must follow an element symbol or a closing bracket`,
          start,
          end,
        ),
      );
    }
    if (c in OPENER_OF) {
      if (group === undefined) {
        return this.fail(syntax(`stray \`${c}\` with no matching \`${OPENER_OF[c]}\``, start, start + 1));
      }
      const closer = CLOSER_OF[group.opener];
      const fixed = text.slice(0, start) + closer + text.slice(start + 1);
      return this.fail({
        ...syntax(
          `\`${c}\` does not match the \`${group.opener}\` at offset ${group.openPos}: expected \`${closer}\``,
          start,
          start + 1,
        ),
        fixes: [{ title: `Change \`${c}\` to \`${closer}\``, replacement: fixed }],
      });
    }
    if (c === '^' || isBareSign(c) || isSuperscriptSign(c) || SUPERSCRIPT_DIGITS.includes(c)) {
      return this.fail(this.misplacedCharge());
    }
    if (HYDRATE_SEPARATORS.has(c)) {
      return this.fail(
        syntax(`the separator \`${c}\` joins whole parts such as \`CuSO4·5H2O\` and cannot appear inside a group`, start, start + 1),
      );
    }
    const codePoint = text.codePointAt(start) ?? 0;
    const char = String.fromCodePoint(codePoint);
    const end = start + char.length;
    if (/\s/.test(char)) return this.fail(syntax('unexpected space inside the formula', start, end));
    const expected = group
      ? `an element symbol, a group, a subscript or \`${CLOSER_OF[group.opener]}\``
      : 'an element symbol, a group, a subscript, a separator such as `·`, or a charge at the end';
    return this.fail(syntax(`unexpected character \`${char}\`: expected ${expected}`, start, end));
  }

  /** A charge sign, caret or superscript that is not the charge at the very end. */
  private misplacedCharge(): FormulaProblem {
    const text = this.text;
    const start = this.pos;
    let end = start + 1;
    while (end < text.length && isChargeChar(text[end])) end++;
    const chunk = text.slice(start, end);

    const signFirst = end === text.length ? SIGN_THEN_SIZE_AT_END.exec(chunk) : null;
    if (signFirst) {
      const fixed = text.slice(0, start) + formatFormulaCharge(signOf(signFirst[1]) * Number(signFirst[2]));
      return {
        ...syntax(`write the size of a charge before its sign: \`${fixed}\``, start, end),
        fixes: [{ title: `Write \`${fixed}\``, replacement: fixed }],
      };
    }
    const middle = 'a charge can only come at the very end of the formula';
    const caretCharge = CARET_CHARGE_PREFIX.exec(chunk);
    if (caretCharge) return syntax(middle, start, start + caretCharge[0].length);
    if (isBareSign(chunk[0])) return syntax(middle, start, start + runLength(chunk, isBareSign));
    if (chunk[0] === '^') {
      return syntax('malformed charge after `^`: write the size then the sign, e.g. `^2+` or `^-`', start, end);
    }
    const superscripts = runLength(chunk, (c) => SUPERSCRIPT_DIGITS.includes(c) || isSuperscriptSign(c));
    if (isSuperscriptSign(chunk[superscripts - 1])) return syntax(middle, start, start + superscripts);
    return syntax(
      'superscript digits are only used for a charge at the end, followed by `⁺` or `⁻` (e.g. `Fe³⁺`)',
      start,
      start + superscripts,
    );
  }

  private unknownElement(symbol: string, start: number, end: number): FormulaProblem {
    const text = this.text;
    const candidates: { symbol: string; from: number }[] = [];
    // `CL`, `NACl`: the previous capital and this letter lowered may form the intended symbol.
    if (symbol.length === 1 && start > 0 && isUpper(text[start - 1])) {
      const joined = text[start - 1] + symbol.toLowerCase();
      if (isElementSymbol(joined)) candidates.push({ symbol: joined, from: start - 1 });
    }
    for (const s of suggestSymbols(symbol, MAX_SUGGESTIONS)) {
      if (candidates.length < MAX_SUGGESTIONS && !candidates.some((c) => c.symbol === s)) {
        candidates.push({ symbol: s, from: start });
      }
    }
    const fixes = candidates.map((c) => {
      const replacement = text.slice(0, c.from) + c.symbol + text.slice(end);
      return { title: `Change to \`${replacement}\``, replacement };
    });
    const hint = candidates.length > 0 ? `; did you mean ${orList(candidates.map((c) => c.symbol))}?` : '';
    return {
      code: 'unknown-element',
      severity: 'error',
      message: `unknown element symbol \`${symbol}\`${hint}`,
      start,
      end,
      ...(fixes.length > 0 ? { fixes } : {}),
    };
  }

  /** A lowercase letter where an element symbol must start (`h2o`, `H2o`). */
  private lowercaseStart(): FormulaProblem {
    const text = this.text;
    const start = this.pos;
    let end = start;
    while (end < this.end && isLower(text[end])) end++;
    const word = text.slice(start, end);
    const suggestions: string[] = [];
    const capitalised = word[0].toUpperCase() + word.slice(1);
    if (isElementSymbol(capitalised)) suggestions.push(capitalised);
    const upper = word.toUpperCase();
    if (word.length > 1 && [...upper].every((letter) => isElementSymbol(letter))) suggestions.push(upper);
    let message = 'element symbols start with a capital letter';
    if (suggestions.length > 0) message += `; did you mean ${orList(suggestions)}?`;
    else if (word === 'e') message += '; the electron on its own is written `e-`';
    else message += `; \`${word}\` is not an element symbol`;
    const fixes = suggestions.map((s) => {
      const replacement = text.slice(0, start) + s + text.slice(end);
      return { title: `Change to \`${replacement}\``, replacement };
    });
    return { ...syntax(message, start, end), ...(fixes.length > 0 ? { fixes } : {}) };
  }

  private fail(problem: FormulaProblem): undefined {
    this.problem ??= problem;
    return undefined;
  }

  private atEnd(): boolean {
    return this.pos >= this.end;
  }

  /** The character at pos, or '' at the end of the body. */
  private peek(): string {
    return this.pos < this.end ? this.text[this.pos] : '';
  }
}

// ---------------------------------------------------------------------------
// Small helpers

function syntax(message: string, start: number, end: number): FormulaProblem {
  return { code: 'syntax', severity: 'error', message, start, end };
}

function fail(problem: FormulaProblem): FormulaResult {
  return { ok: false, problems: [problem] };
}

function problem(p: FormulaProblem): ChargeScan {
  return { kind: 'problem', problem: p };
}

function orList(items: readonly string[]): string {
  const quoted = items.map((s) => `\`${s}\``);
  return quoted.length <= 1 ? quoted.join('') : `${quoted.slice(0, -1).join(', ')} or ${quoted[quoted.length - 1]}`;
}

function isUpper(c: string): boolean {
  return c >= 'A' && c <= 'Z' && c.length === 1;
}

function isLower(c: string): boolean {
  return c >= 'a' && c <= 'z' && c.length === 1;
}

function isAsciiDigit(c: string): boolean {
  return c >= '0' && c <= '9' && c.length === 1;
}

function isSubscriptDigit(c: string): boolean {
  return c.length === 1 && SUBSCRIPT_DIGITS.includes(c);
}

function isBareSign(c: string): boolean {
  return c.length === 1 && (c === PLUS_SIGN || MINUS_SIGNS.includes(c));
}

function isSuperscriptSign(c: string): boolean {
  return c === SUPERSCRIPT_PLUS || c === SUPERSCRIPT_MINUS;
}

function isChargeChar(c: string): boolean {
  return c === '^' || isBareSign(c) || isSuperscriptSign(c) || isAsciiDigit(c) || SUPERSCRIPT_DIGITS.includes(c);
}

function signOf(c: string): 1 | -1 {
  return c === PLUS_SIGN || c === SUPERSCRIPT_PLUS ? 1 : -1;
}

function sameSigns(signs: string): boolean {
  const first = signOf(signs[0]);
  return [...signs].every((s) => signOf(s) === first);
}

/** How many characters at the start of `text` pass `test`. */
function runLength(text: string, test: (c: string) => boolean): number {
  let n = 0;
  while (n < text.length && test(text[n])) n++;
  return n;
}

/** Maps digits written in another script (`digitSet` lists 0..9) to ASCII. */
function toAsciiDigits(written: string, digitSet: string): string {
  return [...written].map((d) => String(digitSet.indexOf(d))).join('');
}
