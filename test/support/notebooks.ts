// Notebook texts shared by tests: the textbook esterification (acid + EtOH ⇌
// ester + water, all liquid, K = 4 at 60 °C, ΔH° illustrative) with one batch
// of 1 mol acid and 1 equiv ethanol, to which a test appends batch lines.

export function esterNotebook(batchLines: readonly string[]): string {
  return [
    'species acid = C6H12O2 (l)',
    'species EtOH = C2H5OH (l)',
    'esterify: acid + EtOH <=> C8H16O2(l) + H2O(l)',
    '  K = 4.0 at 60 °C',
    '  ΔH° = -4.5 kJ/mol',
    'batch b at 60 °C',
    '  acid 1.0 mol',
    '  EtOH 1 equiv',
    ...batchLines,
    '',
  ].join('\n');
}
