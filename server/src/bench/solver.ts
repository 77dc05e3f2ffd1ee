// Speed benchmark of the equilibrium solver: median time per solve for a single
// reaction, the two-reaction steam-reforming system, and a seeded random network
// of 20 reactions over 40 species built from element-like conservation. The
// targets are 2 µs, 30 µs and 3 ms per solve; timings live here, never in tests.
import { performance } from 'node:perf_hooks';
import { solveEquilibrium, type EquilibriumProblem, type SolverPhase } from '../chem/equilibrium';

const SINGLE_TARGET_US = 2;
const STEAM_TARGET_US = 30;
const NETWORK_TARGET_US = 3000;
/** Timed batches per case (the median is over batches) and the minimum time per batch. */
const BATCHES = 31;
const MIN_BATCH_MS = 20;
const NETWORK_SEED = 20240611;
const NETWORK_ELEMENTS = 6;
const NETWORK_SPECIES = 40;
const NETWORK_REACTIONS = 20;

/** Seeded mulberry32 (same generator as the test helper), so the network is the same on every run. */
function seeded(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Dissociation of N2O4 to NO2 at constant pressure (one reaction, two gases). */
export function singleReactionProblem(): EquilibriumProblem {
  return {
    species: [
      { id: 'N2O4', phase: 'g', n0: 1 },
      { id: 'NO2', phase: 'g', n0: 0 },
    ],
    reactions: [{ label: 'dissociation', nu: [-1, 2], lnK: Math.log(0.15) }],
    conditions: { kind: 'constant-pressure', T: 298.15, P: 1e5 },
  };
}

/** Steam reforming CH4 + H2O ⇌ CO + 3 H2 with the water-gas shift CO + H2O ⇌ CO2 + H2, steam:carbon 3, 10 bar. */
export function steamReformingProblem(): EquilibriumProblem {
  return {
    species: [
      { id: 'CH4', phase: 'g', n0: 1 },
      { id: 'H2O', phase: 'g', n0: 3 },
      { id: 'CO', phase: 'g', n0: 0 },
      { id: 'H2', phase: 'g', n0: 0 },
      { id: 'CO2', phase: 'g', n0: 0 },
    ],
    // Illustrative K near 1000 K (orders of magnitude from memory): reforming ~26, shift ~1.4.
    reactions: [
      { label: 'reforming', nu: [-1, -1, 1, 3, 0], lnK: Math.log(26) },
      { label: 'shift', nu: [0, -1, -1, 1, 1], lnK: Math.log(1.4) },
    ],
    conditions: { kind: 'constant-pressure', T: 1000, P: 1e6 },
  };
}

/**
 * A seeded random network: 6 element-like species, and compounds each formed from two or
 * three earlier species (so every formation reaction is balanced in whole numbers);
 * reactions are formation reactions and differences of two (exchanges), with ln K
 * uniform in [-15, 15]. Mostly gases, some liquids and two solids; constant pressure.
 */
export function randomNetworkProblem(seed = NETWORK_SEED): EquilibriumProblem {
  const rand = seeded(seed);
  const int = (lo: number, hi: number): number => lo + Math.floor(rand() * (hi - lo + 1));
  const formation: number[][] = [];
  const phases: SolverPhase[] = [];
  for (let i = 0; i < NETWORK_SPECIES; i++) {
    phases.push(i >= NETWORK_SPECIES - 2 ? 's' : rand() < 0.2 ? 'l' : 'g');
    const nu = new Array<number>(NETWORK_SPECIES).fill(0);
    if (i >= NETWORK_ELEMENTS) {
      const parts = int(2, 3);
      for (let k = 0; k < parts; k++) nu[int(0, i - 1)] -= 1;
      nu[i] = 1;
    }
    formation.push(nu);
  }
  const reactions = [];
  const used = new Set<number>();
  while (reactions.length < NETWORK_REACTIONS) {
    const a = int(NETWORK_ELEMENTS, NETWORK_SPECIES - 1);
    if (used.has(a)) continue;
    used.add(a);
    const nu = [...formation[a]];
    if (rand() < 0.4) {
      const b = int(NETWORK_ELEMENTS, NETWORK_SPECIES - 1);
      if (b !== a) for (let i = 0; i < NETWORK_SPECIES; i++) nu[i] -= formation[b][i];
    }
    if (nu.every((v) => v >= 0) || nu.every((v) => v <= 0)) continue;
    reactions.push({ label: `R${reactions.length + 1}`, nu, lnK: -15 + 30 * rand() });
  }
  const species = phases.map((phase, i) => ({ id: `X${i + 1}`, phase, n0: rand() < 0.6 ? 0.1 + 2 * rand() : 0 }));
  return { species, reactions, conditions: { kind: 'constant-pressure', T: 800, P: 2e5 } };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Median µs per solve: batches of repeated solves, each batch long enough to time reliably. */
function timeSolve(problem: EquilibriumProblem): { micros: number; status: string; solves: number } {
  let status = solveEquilibrium(problem).status;
  let reps = 1;
  for (;;) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) status = solveEquilibrium(problem).status;
    if (performance.now() - t0 >= MIN_BATCH_MS) break;
    reps *= 2;
  }
  const times: number[] = [];
  for (let b = 0; b < BATCHES; b++) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) solveEquilibrium(problem);
    times.push(((performance.now() - t0) * 1000) / reps);
  }
  return { micros: median(times), status, solves: reps * BATCHES };
}

/** Lines of report, one per case: median µs per solve and the fraction of its target. */
export function runSolverBenchmarks(): string[] {
  const cases: Array<[string, EquilibriumProblem, number]> = [
    ['equilibrium, single reaction (N2O4 ⇌ 2 NO2)', singleReactionProblem(), SINGLE_TARGET_US],
    ['equilibrium, steam reforming + water-gas shift', steamReformingProblem(), STEAM_TARGET_US],
    [`equilibrium, random network (${NETWORK_REACTIONS} reactions, ${NETWORK_SPECIES} species)`, randomNetworkProblem(), NETWORK_TARGET_US],
  ];
  return cases.map(([name, problem, target]) => {
    const { micros, status, solves } = timeSolve(problem);
    return `${name}: median ${micros.toFixed(2)} µs per solve over ${solves} solves, ${status} (target < ${target} µs: ${(micros / target).toFixed(3)} of budget)`;
  });
}
