// Activities and reaction quotients. `activities` is the public, model-free
// definition (used by tests and hovers); the log forms below work on a
// prepared problem and keep full relative precision for trace amounts.
import { GAS_GROUP, LIQUID_GROUP, PURE, type Prepared } from './problem';
import { GAS_CONSTANT, STANDARD_CONCENTRATION, STANDARD_PRESSURE, type EquilibriumProblem, type SolverPhase } from './types';

/**
 * Activities for amounts `n` (mol, one per species), by the standard states of
 * {@link SolverPhase}: gas y·P/P° at constant pressure or n·R·T/(V·P°) at constant volume;
 * liquid mole fraction among all 'l' species; solute n/(liquidVolume·c°); solid and
 * solvent 1 when n > 0, else 0. A mole fraction in an empty phase is 0. Nothing is
 * validated here: an entry that cannot be computed (an 'aq' species without a liquid
 * volume, or invalid conditions) is NaN — `solveEquilibrium` never produces one.
 */
export function activities(problem: EquilibriumProblem, n: readonly number[]): number[] {
  const { species } = problem;
  let gas = 0;
  let liquid = 0;
  for (let i = 0; i < species.length; i++) {
    if (species[i].phase === 'g') gas += n[i];
    else if (species[i].phase === 'l') liquid += n[i];
  }
  const out: number[] = [];
  for (let i = 0; i < species.length; i++) out.push(activity(problem, species[i].phase, n[i], gas, liquid));
  return out;
}

/** The activity of one species with amount `amount` (mol), given the gas and liquid totals. */
function activity(problem: EquilibriumProblem, phase: SolverPhase, amount: number, gas: number, liquid: number): number {
  const { conditions } = problem;
  switch (phase) {
    case 'g':
      if (conditions.kind === 'constant-pressure') return gas > 0 ? (amount / gas) * (conditions.P / STANDARD_PRESSURE) : 0;
      return (amount * GAS_CONSTANT * conditions.T) / (conditions.gasVolume * STANDARD_PRESSURE);
    case 'l':
      return liquid > 0 ? amount / liquid : 0;
    case 'aq':
      return problem.liquidVolume !== undefined && problem.liquidVolume > 0 ? amount / (problem.liquidVolume * STANDARD_CONCENTRATION) : Number.NaN;
    default:
      return amount > 0 ? 1 : 0;
  }
}

/**
 * ln a_i in the convention of reaction quotients: a pure phase contributes its constant
 * pure-phase ln a whether present or not; a mixture species has ln a = -Infinity at n = 0.
 * Inert members of a mole-fraction phase count in its total.
 */
export function quotientLogActivities(p: Prepared, n: ArrayLike<number>, out: Float64Array): void {
  let gasTotal = 0;
  let liquidTotal = 0;
  for (let i = 0; i < p.speciesCount; i++) {
    const g = p.group[i];
    if (g === GAS_GROUP) gasTotal += n[i];
    else if (g === LIQUID_GROUP) liquidTotal += n[i];
  }
  // Inert members of a mole-fraction phase are FRACTION species of the same group, so the
  // totals include them. The ln of a group total is taken once, when first needed.
  let logGas = Number.NaN;
  let logLiquid = Number.NaN;
  for (let i = 0; i < p.speciesCount; i++) {
    if (p.model[i] === PURE) out[i] = p.offset[i];
    else if (n[i] > 0) {
      const g = p.group[i];
      let logTotal = 0;
      if (g === GAS_GROUP) {
        if (Number.isNaN(logGas)) logGas = Math.log(gasTotal);
        logTotal = logGas;
      } else if (g === LIQUID_GROUP) {
        if (Number.isNaN(logLiquid)) logLiquid = Math.log(liquidTotal);
        logTotal = logLiquid;
      }
      out[i] = Math.log(n[i]) + p.offset[i] - logTotal;
    } else out[i] = Number.NEGATIVE_INFINITY;
  }
}

/**
 * ln Q = Σ ν_i ln a_i for one reaction (row r of the stoichiometric matrix), never NaN:
 * -Infinity if a product has ln a = -Infinity (including the undefined 0/0 case),
 * +Infinity if only a reactant has.
 */
export function lnQuotient(p: Prepared, r: number, logA: Float64Array): number {
  return lnQuotientRow(p.nu, r * p.speciesCount, p.speciesCount, logA);
}

/** ln Q as {@link lnQuotient} for the S coefficients of `nu` from index `start`. */
export function lnQuotientRow(nu: ArrayLike<number>, start: number, S: number, logA: Float64Array): number {
  let sum = 0;
  let productAbsent = false;
  let reactantAbsent = false;
  for (let i = 0; i < S; i++) {
    const v = nu[start + i];
    if (v === 0) continue;
    const l = logA[i];
    if (l === Number.NEGATIVE_INFINITY) {
      if (v > 0) productAbsent = true;
      else reactantAbsent = true;
    } else sum += v * l;
  }
  if (productAbsent) return Number.NEGATIVE_INFINITY;
  if (reactantAbsent) return Number.POSITIVE_INFINITY;
  return sum;
}
