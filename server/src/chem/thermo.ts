// Equilibrium constants at temperature from whatever thermodynamic data the
// chemist has: K at one or more temperatures, ΔG°, ΔH°, ΔS° and ΔCp° of the
// reaction, or formation data of its species (Hess's law). Pure functions of
// SI numbers; the notebook layer reads the data and reports the warnings.

/** Molar gas constant, J/(mol K); exact in the 2019 SI (CODATA 2018). */
export const R = 8.314462618;
/** Standard pressure P° for gases, Pa (IUPAC: 1 bar). */
export const STANDARD_PRESSURE = 1e5;
/** Standard concentration c° for solutes, mol/m^3 (1 mol/L). */
export const STANDARD_CONCENTRATION = 1000;
/** Reference temperature of tabulated formation data, K (common practice). */
export const T_REF = 298.15;
/** Two values of the same K that differ by more than this (relative) get a warning. */
export const CONSISTENCY_TOLERANCE = 0.01;

/** A thermodynamic (dimensionless) K known at a temperature, as ln K. */
export interface KPoint {
  readonly lnK: number;
  /** K */
  readonly T: number;
  /** How it was written, for messages: `K`, `log K`, `Kp`, `ΔG°`, ... */
  readonly written: string;
}

/** A reaction's own data, SI units (J/mol, J/(mol K)). */
export interface ReactionThermo {
  readonly points: readonly KPoint[];
  readonly dH?: number;
  readonly dS?: number;
  readonly dCp?: number;
}

/** How the K used at a temperature was obtained (shown on hover). */
export type KSource =
  | { readonly kind: 'given'; readonly T: number; readonly written: string }
  | { readonly kind: 'van-t-hoff'; readonly fromT: number; readonly written: string; readonly dH: number; readonly dCp?: number }
  | { readonly kind: 'two-point'; readonly T1: number; readonly T2: number }
  | { readonly kind: 'enthalpy-entropy'; readonly dH: number; readonly dS: number; readonly dCp?: number }
  | { readonly kind: 'hess'; readonly detail: string }
  | { readonly kind: 'assumed-constant'; readonly fromT: number; readonly written: string };

export interface KAtT {
  readonly lnK: number;
  readonly source: KSource;
  /** Problems a chemist should see (disagreeing data, K taken as constant). */
  readonly warnings: readonly string[];
}

/** Temperatures closer than this (K) count as the same temperature. */
const SAME_T = 1e-6;

/**
 * ln K at T from a reaction's data, by the most direct route available:
 * 1. K given at T itself.
 * 2. The nearest given K moved to T with the integrated van 't Hoff equation:
 *    constant ΔH°, or with constant ΔCp° when given:
 *      ln K2 = ln K1 − ΔH1/R·(1/T2 − 1/T1) + ΔCp/R·(ln(T2/T1) + T1/T2 − 1).
 * 3. ΔH° and ΔS° (at 298.15 K): ΔG°(T) = ΔH°(T) − T·ΔS°(T), with ΔCp° terms when given.
 * 4. Two or more K at other temperatures: ln K linear in 1/T through the two nearest
 *    (van 't Hoff with the ΔH° those points imply).
 * 5. One K at another temperature and no ΔH°: K taken as constant, with a warning.
 * Data given twice (K and ΔH°/ΔS° at the same T, or two K at one T) that disagree by more
 * than 1% get a warning saying by how much. Returns undefined when there are no data.
 */
export function lnKAt(data: ReactionThermo, T: number): KAtT | undefined {
  const warnings = consistencyWarnings(data);
  const { points, dH, dS, dCp } = data;
  const exact = points.find((p) => Math.abs(p.T - T) < SAME_T);
  if (exact) return { lnK: exact.lnK, source: { kind: 'given', T: exact.T, written: exact.written }, warnings };
  if (points.length > 0 && dH !== undefined) {
    const nearest = nearestPoint(points, T);
    return {
      lnK: vantHoff(nearest.lnK, nearest.T, T, dH, dCp),
      source: { kind: 'van-t-hoff', fromT: nearest.T, written: nearest.written, dH, dCp },
      warnings,
    };
  }
  if (dH !== undefined && dS !== undefined) {
    return { lnK: lnKFromEnthalpyEntropy(dH, dS, dCp, T), source: { kind: 'enthalpy-entropy', dH, dS, dCp }, warnings };
  }
  if (points.length >= 2) {
    const sorted = [...points].sort((a, b) => Math.abs(1 / a.T - 1 / T) - Math.abs(1 / b.T - 1 / T));
    const p1 = sorted[0];
    const p2 = sorted.find((p) => Math.abs(p.T - p1.T) >= SAME_T);
    if (p2) {
      const slope = (p2.lnK - p1.lnK) / (1 / p2.T - 1 / p1.T);
      return { lnK: p1.lnK + slope * (1 / T - 1 / p1.T), source: { kind: 'two-point', T1: p1.T, T2: p2.T }, warnings };
    }
  }
  if (points.length > 0) {
    const nearest = nearestPoint(points, T);
    return {
      lnK: nearest.lnK,
      source: { kind: 'assumed-constant', fromT: nearest.T, written: nearest.written },
      warnings: [
        ...warnings,
        `K is given at ${(nearest.T - 273.15).toFixed(2)} °C but used at ${(T - 273.15).toFixed(2)} °C with no ΔH°; it is taken as constant. Add ΔH° (or K at a second temperature) for a van 't Hoff correction.`,
      ],
    };
  }
  return undefined;
}

function nearestPoint(points: readonly KPoint[], T: number): KPoint {
  let best = points[0];
  for (const p of points) if (Math.abs(1 / p.T - 1 / T) < Math.abs(1 / best.T - 1 / T)) best = p;
  return best;
}

/** Integrated van 't Hoff equation from (T1, ln K1) to T2 with ΔH° at T1 and constant ΔCp° (0 when absent). */
export function vantHoff(lnK1: number, T1: number, T2: number, dH1: number, dCp = 0): number {
  return lnK1 - (dH1 / R) * (1 / T2 - 1 / T1) + (dCp / R) * (Math.log(T2 / T1) + T1 / T2 - 1);
}

/** ln K at T from ΔH° and ΔS° at 298.15 K, with constant ΔCp° when given (0 otherwise). */
export function lnKFromEnthalpyEntropy(dH: number, dS: number, dCp: number | undefined, T: number): number {
  const cp = dCp ?? 0;
  const H = dH + cp * (T - T_REF);
  const S = dS + cp * Math.log(T / T_REF);
  return -(H - T * S) / (R * T);
}

/** ln K from ΔG° at T: ln K = −ΔG°/(R T). */
export function lnKFromGibbs(dG: number, T: number): number {
  return -dG / (R * T);
}

/** ΔG° at T from ln K: ΔG° = −R T ln K (J/mol). */
export function gibbsFromLnK(lnK: number, T: number): number {
  return -R * T * lnK;
}

/** How far apart two K are, as larger/smaller − 1 (symmetric, so the order does not matter). */
function relativeDifference(lnA: number, lnB: number): number {
  return Math.expm1(Math.abs(lnA - lnB));
}

function formatPercent(x: number): string {
  return x >= 10 ? `${x.toExponential(1)}-fold` : `${(x * 100).toPrecision(2)} %`;
}

/** Warnings for data that say the same thing twice and disagree by more than 1%. */
export function consistencyWarnings(data: ReactionThermo): string[] {
  const out: string[] = [];
  const { points, dH, dS, dCp } = data;
  for (let i = 0; i < points.length; i++) {
    for (let j = i + 1; j < points.length; j++) {
      const a = points[i];
      const b = points[j];
      if (Math.abs(a.T - b.T) >= SAME_T) continue;
      const diff = relativeDifference(a.lnK, b.lnK);
      if (diff > CONSISTENCY_TOLERANCE) {
        out.push(`${a.written} and ${b.written} at ${(a.T - 273.15).toFixed(2)} °C disagree by ${formatPercent(diff)} in K; the first is used`);
      }
    }
  }
  if (dH !== undefined && dS !== undefined) {
    for (const p of points) {
      const fromHS = lnKFromEnthalpyEntropy(dH, dS, dCp, p.T);
      const diff = relativeDifference(p.lnK, fromHS);
      if (diff > CONSISTENCY_TOLERANCE) {
        out.push(`${p.written} at ${(p.T - 273.15).toFixed(2)} °C and K from ΔH° and ΔS° disagree by ${formatPercent(diff)}; ${p.written} is used`);
      }
    }
  }
  if (dH !== undefined && points.length >= 2) {
    const sorted = [...points].sort((a, b) => a.T - b.T);
    for (let i = 1; i < sorted.length; i++) {
      const a = sorted[i - 1];
      const b = sorted[i];
      if (Math.abs(a.T - b.T) < SAME_T) continue;
      const predicted = vantHoff(a.lnK, a.T, b.T, dH, dCp);
      const diff = relativeDifference(b.lnK, predicted);
      if (diff > CONSISTENCY_TOLERANCE) {
        out.push(
          `K at ${(a.T - 273.15).toFixed(2)} °C moved by ΔH° to ${(b.T - 273.15).toFixed(2)} °C disagrees with the K given there by ${formatPercent(diff)}; the nearest given K is used`,
        );
      }
    }
  }
  return out;
}

/** Formation data of one species at 298.15 K (SI). */
export interface FormationData {
  readonly dfG?: number;
  readonly dfH?: number;
  readonly S?: number;
  readonly Cp?: number;
}

/**
 * A reaction's data by Hess's law from its species' formation data: Σν·ΔfG°, Σν·ΔfH°,
 * Σν·S°, Σν·Cp°, each only when every species has it. ΔrG° (as K at 298.15 K) is preferred;
 * else ΔrH° with ΔrS°.
 */
export function hessData(terms: readonly { nu: number; data: FormationData | undefined }[]): ReactionThermo | undefined {
  const sum = (get: (d: FormationData) => number | undefined): number | undefined => {
    let total = 0;
    for (const t of terms) {
      const v = t.data ? get(t.data) : undefined;
      if (v === undefined) return undefined;
      total += t.nu * v;
    }
    return total;
  };
  const dG = sum((d) => d.dfG);
  const dH = sum((d) => d.dfH);
  const dS = sum((d) => d.S);
  const dCp = sum((d) => d.Cp);
  if (dG === undefined && (dH === undefined || dS === undefined)) return undefined;
  if (dG !== undefined) {
    // ΔrS° is left out when ΔrG° is known: tabulated ΔfG° and ΔfH° − T·S° agree only to their
    // rounding, which would raise needless consistency warnings. ΔrH° still moves K with T.
    return { points: [{ lnK: lnKFromGibbs(dG, T_REF), T: T_REF, written: 'Σν·ΔfG°' }], dH, dCp };
  }
  return { points: [], dH, dS, dCp };
}

/**
 * ΔH° of a reaction at T (J/mol), or undefined when its data have none. ΔH° is taken at the
 * temperature of the nearest given K (the van 't Hoff reference) or, with no K, at 298.15 K,
 * and moved with constant ΔCp° when given (Kirchhoff): ΔH(T) = ΔH(T0) + ΔCp·(T − T0).
 */
export function enthalpyAt(data: ReactionThermo, T: number): number | undefined {
  if (data.dH === undefined) return undefined;
  const T0 = data.points.length > 0 ? nearestPoint(data.points, T).T : T_REF;
  return data.dH + (data.dCp ?? 0) * (T - T0);
}
