// Generates a large, realistic notebook for the benchmark: blocks of species,
// reactions with equilibrium data (one left unbalanced on purpose), and one
// batch per block, in an invented pilot-plant scenario. Deterministic, so runs
// are comparable; the batches differ so that every one is a distinct solve.

const SALTS = ['NaHCO3', 'CuSO4·5H2O', 'K4[Fe(CN)6]', 'Ca3(PO4)2', 'MgSO4·7H2O'];

/** One block: 24 lines with species, five reactions and one batch. */
function block(b: number): string[] {
  const excess = (1 + (b % 9) * 0.25).toFixed(2);
  const t = 40 + (b % 5) * 10;
  return [
    `# block ${b}: esterification trial series`,
    `species acid${b} = C6H12O2 (l)`,
    `  density 0.93 g/mL`,
    `species alc${b} = C2H5OH (l)`,
    `  density 0.789 g/mL`,
    `species est${b} = C8H16O2 (l)`,
    `species salt${b} = ${SALTS[b % SALTS.length]} (s)   # lot ${b}`,
    `step${b}: acid${b} + alc${b} <=> est${b} + H2O(l)`,
    `  K = ${(3 + (b % 4) * 0.5).toFixed(1)} at 60 °C`,
    `  ΔH° = -4.5 kJ/mol`,
    `burn${b}: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)`,
    `redox${b}: MnO4^-(aq) + 5 Fe^2+(aq) + 8 H^+(aq) -> Mn^2+(aq) + 5 Fe^3+(aq) + 4 H2O(l)`,
    `oops${b}: Cu(s) + HNO3(aq) -> Cu(NO3)2(aq) + NO(g) + H2O(l)   # left unbalanced on purpose`,
    `  K = 1e5 at 25 °C`,
    `gas${b}: N2O4(g) <=> 2 NO2(g)`,
    `  Kp = 0.15 atm at 25 °C`,
    `  ΔH° = 57.2 kJ/mol`,
    ``,
    `batch run-${b} at ${t} °C, 1 atm`,
    `  acid${b} 1.0 mol`,
    `  alc${b} ${excess} equiv`,
    `  volume 250 mL`,
    `  basis acid${b}`,
    `  uses step${b}`,
  ];
}

export const LINES_PER_BLOCK = 24;

export function generateNotebook(targetLines: number): string {
  const out: string[] = ['# generated notebook for the benchmark: an invented pilot-plant campaign', ''];
  for (let b = 0; out.length + LINES_PER_BLOCK <= targetLines; b++) out.push(...block(b));
  return out.join('\n') + '\n';
}
