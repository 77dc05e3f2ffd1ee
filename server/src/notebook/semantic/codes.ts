// The one table of diagnostic codes. Codes are stable ids: users search for
// them and silence them, and tests assert them instead of message text.

export type Severity = 'error' | 'warning' | 'information' | 'hint';

export const DIAGNOSTIC_CODES = {
  syntax: { severity: 'error', summary: 'a line that does not follow the notebook format' },
  'line-too-long': { severity: 'error', summary: 'a line too long to be read' },
  'unknown-element': { severity: 'error', summary: 'a formula names an element symbol that does not exist' },
  'bad-formula': { severity: 'error', summary: 'a formula that cannot be read (brackets, digits, charge)' },
  'ambiguous-charge': { severity: 'warning', summary: 'a charge like `Fe3+` that reads two ways' },
  'unknown-species': { severity: 'error', summary: 'a name that is neither a declared species nor a formula' },
  'unknown-phase': { severity: 'error', summary: 'a phase other than (g), (l), (s) or (aq)' },
  'phase-mismatch': { severity: 'warning', summary: 'a term gives a different phase from the species declaration' },
  'bad-coefficient': { severity: 'error', summary: 'a stoichiometric coefficient that is zero, negative or not a number' },
  'unbalanced-elements': { severity: 'error', summary: 'an equation whose elements do not balance' },
  'unbalanced-charge': { severity: 'error', summary: 'an equation whose charge does not balance' },
  'no-balance': { severity: 'error', summary: 'no set of positive coefficients balances the equation' },
  'several-balances': { severity: 'warning', summary: 'several independent balances exist, so none is chosen' },
  'bad-quantity': { severity: 'error', summary: 'a number or unit that is missing, malformed, out of range or of the wrong kind' },
  'unknown-property': { severity: 'error', summary: 'a property keyword that does not exist for this statement' },
  'missing-temperature': { severity: 'error', summary: 'an equilibrium constant without the temperature it belongs to' },
  'duplicate-name': { severity: 'warning', summary: 'a species or batch name declared twice' },
  'duplicate-label': { severity: 'warning', summary: 'a reaction label used twice' },
  'duplicate-property': { severity: 'warning', summary: 'a property or amount given twice' },
  'reserved-name': { severity: 'error', summary: 'a name that is a keyword of the notebook' },
  'unknown-label': { severity: 'error', summary: '`uses` names a reaction label that does not exist' },
  'bad-basis': { severity: 'error', summary: '`basis` or `equiv` that cannot be resolved' },
  'same-species-both-sides': { severity: 'warning', summary: 'the same species on both sides of an equation' },
  'inconsistent-data': { severity: 'warning', summary: 'thermodynamic data given twice that disagree by more than 1%' },
  'missing-data': { severity: 'error', summary: 'a batch lacks data it needs to be solved (K, density, liquid volume, vessel, phase)' },
  'k-extrapolated': { severity: 'warning', summary: 'a K used at another temperature with no ΔH°, taken as constant' },
  'no-convergence': { severity: 'error', summary: 'the equilibrium solve of a batch did not converge or its inputs are inconsistent' },
  'pressure-caution': { severity: 'warning', summary: 'a closed vessel whose computed pressure exceeds 1.5 bar' },
  'bad-target': { severity: 'error', summary: 'a `target` line that cannot be read or searched' },
  'bad-sweep': { severity: 'error', summary: 'a `vary` line that cannot be read or swept' },
  'heat-caution': { severity: 'warning', summary: 'a step whose adiabatic temperature rise would exceed 50 K' },
  'gas-caution': { severity: 'warning', summary: 'a step that gives off gas inside a closed vessel' },
  'unknown-code': { severity: 'warning', summary: 'an `accept:` note names a code that does not exist' },
  'unused-accept': { severity: 'hint', summary: 'an `accept:` note that silences nothing on its line' },
  'unknown-batch': { severity: 'error', summary: 'a follow-on batch starts `from` a batch that does not exist' },
  'batch-cycle': { severity: 'error', summary: 'follow-on batches that start from each other in a loop' },
  'bad-operation': { severity: 'error', summary: 'an `add`, `remove` or `vent` line that cannot be applied' },
  'unused-pressure': { severity: 'warning', summary: 'a batch pressure written for a closed vessel, where the pressure is computed instead' },
} as const satisfies Record<string, { severity: Severity; summary: string }>;

export type DiagnosticCode = keyof typeof DIAGNOSTIC_CODES;

export function defaultSeverity(code: DiagnosticCode): Severity {
  return DIAGNOSTIC_CODES[code].severity;
}

export interface TextEdit {
  readonly start: number;
  readonly end: number;
  readonly newText: string;
}

/** A fix the editor can apply (a quick fix): plain offsets, no protocol types. */
export interface Fix {
  readonly title: string;
  readonly edits: readonly TextEdit[];
  readonly preferred: boolean;
}

export interface Diagnostic {
  readonly code: DiagnosticCode;
  readonly severity: Severity;
  readonly message: string;
  readonly start: number;
  readonly end: number;
  readonly fixes: readonly Fix[];
}

export function diagnostic(
  code: DiagnosticCode,
  message: string,
  start: number,
  end: number,
  fixes: readonly Fix[] = [],
  severity: Severity = defaultSeverity(code),
): Diagnostic {
  return { code, severity, message, start, end: Math.max(end, start), fixes };
}
