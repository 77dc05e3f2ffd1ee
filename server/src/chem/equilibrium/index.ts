// The chemical equilibrium solver of the chemistry core: the public API.
export { activities } from './activity';
export { CONSERVATION_TOLERANCE, invalidShaped as resultWithoutAnswer, LNQ_TOLERANCE, solveEquilibrium, type SolveOptions } from './solve';
export {
  GAS_CONSTANT,
  STANDARD_CONCENTRATION,
  STANDARD_PRESSURE,
  type EquilibriumProblem,
  type EquilibriumResult,
  type SolverConditions,
  type SolverPhase,
  type SolverReaction,
  type SolverSpecies,
} from './types';
