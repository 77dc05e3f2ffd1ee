// Generates a large, realistic notebook for the benchmark: species blocks,
// balanced and unbalanced reactions with K data, and batches, in an invented
// scenario. Deterministic, so runs are comparable.

const FORMULAS = ['C6H12O2', 'C2H5OH', 'C8H16O2', 'H2O', 'CH3COOH', 'C4H8O2', 'NaHCO3', 'CuSO4·5H2O', 'K4[Fe(CN)6]', 'Ca3(PO4)2'];

export function generateNotebook(targetLines: number): string {
  const out: string[] = ['# generated notebook for the benchmark: an invented pilot-plant campaign', ''];
  let block = 0;
  while (out.length < targetLines) {
    const b = block++;
    out.push(`species acid${b} = C6H12O2 (l)`, `species alc${b} = C2H5OH (l)`, `species est${b} = C8H16O2 (l)`, `  density 0.87 g/mL`);
    out.push(`species salt${b} = ${FORMULAS[b % FORMULAS.length]} (s)   # lot ${b}`);
    out.push(`step${b}: acid${b} + alc${b} <=> est${b} + H2O(l)`, `  K = 4.0 at 60 °C`);
    out.push(`burn${b}: C3H8(g) + 5 O2(g) -> 3 CO2(g) + 4 H2O(g)`);
    out.push(`redox${b}: MnO4^-(aq) + 5 Fe^2+(aq) + 8 H^+(aq) -> Mn^2+(aq) + 5 Fe^3+(aq) + 4 H2O(l)`);
    out.push(`oops${b}: Cu(s) + HNO3(aq) -> Cu(NO3)2(aq) + NO(g) + H2O(l)   # left unbalanced on purpose`);
    out.push(`  K = 1e5 at 25 °C`);
    out.push(`batch run-${b} at 60 °C, 1 atm`, `  acid${b} 1.0 mol`, `  alc${b} 3 equiv`, `  volume 250 mL`, `  uses step${b}`, '');
  }
  return out.slice(0, targetLines).join('\n') + '\n';
}
