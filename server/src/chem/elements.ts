// The element table as the rest of the core sees it: lookup by symbol, and a
// did-you-mean for unknown symbols. The raw data (IUPAC 2021) lives in
// elements-data.ts; this file only indexes it.
import { ELEMENT_DATA } from './elements-data';

/** How an element's molar-mass value was chosen. */
export type WeightKind =
  /** IUPAC 2021 standard atomic weight given as a single value with uncertainty. */
  | 'standard'
  /** IUPAC 2021 gives an interval; this is the conventional/abridged value for it. */
  | 'conventional'
  /** No standard atomic weight (no stable isotope): mass number of the longest-lived isotope. */
  | 'mass-number'
  /** A single nuclide (D, T): its atomic mass. */
  | 'isotope';

export interface ElementInfo {
  /** Atomic number (1 for D and T). */
  readonly z: number;
  readonly symbol: string;
  readonly name: string;
  /** Molar mass contribution in g/mol. */
  readonly atomicWeight: number;
  readonly weightKind: WeightKind;
}

const bySymbol: ReadonlyMap<string, ElementInfo> = new Map(ELEMENT_DATA.map((e) => [e.symbol, e]));

export const ELEMENTS: readonly ElementInfo[] = ELEMENT_DATA;

export function elementBySymbol(symbol: string): ElementInfo | undefined {
  return bySymbol.get(symbol);
}

export function isElementSymbol(symbol: string): boolean {
  return bySymbol.has(symbol);
}

/**
 * Suggests known symbols for an unknown one: a case fix first (`CL` -> `Cl`),
 * then symbols one edit away. Returns at most `limit` symbols, best first.
 */
export function suggestSymbols(unknown: string, limit = 3): string[] {
  const out: string[] = [];
  const push = (s: string): void => {
    if (bySymbol.has(s) && !out.includes(s)) out.push(s);
  };
  if (unknown.length > 0) {
    push(unknown[0].toUpperCase() + unknown.slice(1).toLowerCase());
  }
  for (const e of ELEMENT_DATA) {
    if (editDistance(unknown.toLowerCase(), e.symbol.toLowerCase()) <= 1) push(e.symbol);
  }
  return out.slice(0, limit);
}

function editDistance(a: string, b: string): number {
  const prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diag = prev[0];
    prev[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const up = prev[j];
      prev[j] = Math.min(prev[j] + 1, prev[j - 1] + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
      diag = up;
    }
  }
  return prev[b.length];
}
