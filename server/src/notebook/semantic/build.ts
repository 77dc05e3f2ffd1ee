// Builds the semantic model from a syntax tree: declares species, resolves the
// terms of every reaction (declared names win over formulas), reads properties
// and batch lines into SI values, and checks element and charge balance. Every
// problem becomes a diagnostic with the range of the text it is about.
import { solveBalance, tallyBalance, type BalanceTerm } from '../../chem/balance';
import { parseFormula, type Formula, type FormulaProblem } from '../../chem/formula';
import { Rational } from '../../chem/rational';
import { forEachToken, type FileNode, type OperationNode, type SyntaxError, type PropertyLine, type PropertyNode, type Token, type TermNode } from '../syntax/tree';
import type { Dimension } from '../../chem/units';
import { IDENTIFIER, RESERVED_WORDS } from '../syntax/parser';
import { diagnostic, type Diagnostic, type Fix } from './codes';
import { balanceDiagnostics } from './balance-check';
import {
  PHASE_NAMES,
  STANDARD_ATMOSPHERE,
  type BatchAmount,
  type BatchModel,
  type BatchOperation,
  type NotebookModel,
  type Phase,
  type ReactionModel,
  type ReactionTerm,
  type ResolvedSpecies,
  type SpeciesDecl,
} from './model';
import { readPropertyLines, readQuantity, type PropertyValue } from './properties';
import { reactionThermo } from './reaction-data';
import type { FormationData } from '../../chem/thermo';


/**
 * `syntaxErrors` are the parser's errors: a reaction whose line has one is not balance-checked,
 * since its terms are incomplete and a balance report would only add noise.
 */
export function buildModel(tree: FileNode, syntaxErrors: readonly SyntaxError[] = [], balances: BalanceCache = new BalanceCache()): NotebookModel {
  return new Builder(tree, syntaxErrors, balances).run();
}

class Builder {
  private readonly diagnostics: Diagnostic[] = [];
  private readonly species = new Map<string, SpeciesDecl>();
  private readonly speciesList: SpeciesDecl[] = [];
  /** Formula text -> parse result, so a formula used many times is read once. */
  private readonly formulaCache = new Map<string, ReturnType<typeof parseFormula>>();

  constructor(
    private readonly tree: FileNode,
    private readonly syntaxErrors: readonly SyntaxError[],
    private readonly balances: BalanceCache,
  ) {
    this.errorStarts = syntaxErrors.map((e) => e.start).sort((a, b) => a - b);
  }

  /** Sorted start offsets of the syntax errors, for a binary search per reaction. */
  private readonly errorStarts: number[];

  private hasSyntaxErrorIn(start: number, end: number): boolean {
    let lo = 0;
    let hi = this.errorStarts.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.errorStarts[mid] < start) lo = mid + 1;
      else hi = mid;
    }
    return lo < this.errorStarts.length && this.errorStarts[lo] < end;
  }

  run(): NotebookModel {
    for (const s of this.tree.statements) if (s.type === 'species') this.declareSpecies(s);
    const reactions: ReactionModel[] = [];
    let position = 0;
    for (const s of this.tree.statements) {
      if (s.type === 'reaction') reactions.push(this.reaction(s, ++position));
    }
    this.checkDuplicateLabels(reactions);
    const batches: BatchModel[] = [];
    for (const s of this.tree.statements) if (s.type === 'batch') batches.push(this.batch(s, reactions));
    this.checkDuplicateBatches(batches);
    this.checkSources(batches);
    return { species: this.species, speciesList: this.speciesList, reactions, batches, diagnostics: this.diagnostics };
  }

  private report(d: Diagnostic): void {
    this.diagnostics.push(d);
  }

  private formula(text: string): ReturnType<typeof parseFormula> {
    let r = this.formulaCache.get(text);
    if (!r) {
      r = parseFormula(text);
      this.formulaCache.set(text, r);
    }
    return r;
  }

  // ---- species --------------------------------------------------------------------------

  private declareSpecies(node: import('../syntax/tree').SpeciesNode): void {
    const nameToken = node.name;
    let formula: Formula | undefined;
    if (node.formula) formula = this.readFormula(node.formula, 'declaration');
    const phase = node.phase ? this.readPhase(node.phase) : undefined;
    const { values, diagnostics } = readPropertyLines(node.properties, 'species');
    for (const d of diagnostics) this.report(d);
    const one = (key: string): PropertyValue | undefined => values.get(key)?.[0];
    if (!nameToken) return;
    const name = nameToken.text;
    if (RESERVED_WORDS.has(name)) {
      this.report(diagnostic('reserved-name', `\`${name}\` is a keyword of the notebook; choose another species name`, nameToken.start, nameToken.end));
      return;
    }
    const purity = one('purity');
    if (purity && (purity.value <= 0 || purity.value > 1)) {
      this.report(diagnostic('bad-quantity', 'purity must be more than 0 % and at most 100 %', purity.range.start, purity.range.end));
    }
    const density = one('density');
    if (density && density.value <= 0) {
      this.report(diagnostic('bad-quantity', 'density must be positive', density.range.start, density.range.end));
    }
    const S = one('S°');
    if (S && S.value <= 0) this.report(diagnostic('bad-quantity', 'a standard molar entropy is positive (third law)', S.range.start, S.range.end));
    const formation: FormationData = { dfG: one('ΔfG°')?.value, dfH: one('ΔfH°')?.value, S: S?.value, Cp: one('Cp°')?.value };
    const decl: SpeciesDecl = {
      name,
      nameToken,
      node,
      formula,
      phase,
      density: density && density.value > 0 ? density.value : undefined,
      purity: purity && purity.value > 0 && purity.value <= 1 ? purity.value : undefined,
      formation: Object.values(formation).some((v) => v !== undefined) ? formation : undefined,
    };
    const previous = this.species.get(name);
    if (previous) {
      this.report(
        diagnostic('duplicate-name', `species \`${name}\` is already declared on line ${lineOf(this.tree, previous.nameToken.start)}; this declaration is ignored`, nameToken.start, nameToken.end),
      );
      return;
    }
    this.species.set(name, decl);
    this.speciesList.push(decl);
  }

  /**
   * Reads a formula token and reports its problems at their exact offsets. `declaration`
   * formulas must be formulas; term formulas may instead be undeclared names (the caller
   * decides how to report those and passes `quiet`).
   */
  private readFormula(tok: Token, _where: 'declaration' | 'term'): Formula | undefined {
    const r = this.formula(tok.text);
    for (const p of r.problems) this.report(this.formulaProblem(tok, p));
    return r.ok ? r.formula : undefined;
  }

  private formulaProblem(tok: Token, p: FormulaProblem): Diagnostic {
    const start = tok.start + p.start;
    const end = tok.start + Math.max(p.end, p.start + 1);
    const fixes: Fix[] = (p.fixes ?? []).map((f) => ({
      title: f.title,
      edits: [{ start: tok.start, end: tok.end, newText: f.replacement }],
      preferred: false,
    }));
    const code = p.code === 'syntax' ? 'bad-formula' : p.code;
    return diagnostic(code, p.message, Math.min(start, tok.end), Math.min(end, tok.end), fixes, p.severity);
  }

  private readPhase(tok: Token): Phase | undefined {
    const inner = tok.text.slice(1, -1);
    if (inner === 'g' || inner === 'l' || inner === 's' || inner === 'aq') return inner;
    this.report(diagnostic('unknown-phase', `unknown phase \`${tok.text}\`; expected (g), (l), (s) or (aq)`, tok.start, tok.end));
    return undefined;
  }

  // ---- reactions ------------------------------------------------------------------------

  private reaction(node: import('../syntax/tree').ReactionNode, position: number): ReactionModel {
    const terms: ReactionTerm[] = [];
    for (const t of node.left) terms.push(this.term(t, 'left'));
    for (const t of node.right) terms.push(this.term(t, 'right'));
    const all = [...node.left, ...node.right];
    const equationStart = all.length > 0 ? Math.min(...all.map((t) => t.start), node.arrow.start) : node.arrow.start;
    const equationEnd = all.length > 0 ? Math.max(...all.map((t) => t.end), node.arrow.end) : node.arrow.end;
    const label = node.label?.text ?? `R${position}`;
    const reversible = node.arrow.text === '<=>' || node.arrow.text === '⇌';
    this.checkSameSpeciesBothSides(terms);
    const props = readPropertyLines(node.properties, 'reaction');
    for (const d of props.diagnostics) this.report(d);
    const data = reactionThermo(props.values, terms);
    for (const d of data.diagnostics) this.report(d);
    let balance: ReactionModel['balance'];
    const headerEnd = node.children.find((c) => c.type === 'token' && c.kind === 'newline')?.start ?? node.end;
    const lineHasSyntaxError = this.hasSyntaxErrorIn(node.start, headerEnd);
    const complete =
      !lineHasSyntaxError &&
      node.left.length > 0 &&
      node.right.length > 0 &&
      terms.every((t) => t.species !== undefined && t.coefficient !== undefined);
    if (complete) balance = this.balances.balance(terms);
    const model: ReactionModel = { node, label, labelIsAuto: !node.label, reversible, terms, equationStart, equationEnd, balance, thermo: data.thermo };
    for (const d of balanceDiagnostics(model)) this.report(d);
    return model;
  }

  private term(node: TermNode, side: 'left' | 'right'): ReactionTerm {
    const coefficient = node.coefficient ? this.readCoefficient(node.coefficient) : Rational.ONE;
    const species = this.resolveSpecies(node.species, node.phase);
    return { node, side, coefficient, species };
  }

  private readCoefficient(tok: Token): Rational | undefined {
    const text = tok.text.replace(/^\+/, '');
    if (/[eE]/.test(text)) {
      const magnitude = Math.abs(Number(text.replace(/−/g, '-')));
      this.report(
        diagnostic(
          'bad-coefficient',
          !Number.isFinite(magnitude) || magnitude > 10 ** MAX_COEFFICIENT_DIGITS
            ? `coefficient \`${tok.text}\` is too large to be meaningful`
            : `write the coefficient \`${tok.text}\` without an exponent, as an integer, decimal or fraction`,
          tok.start,
          tok.end,
        ),
      );
      return undefined;
    }
    const value = Rational.parse(text.replace(/−/g, '-'));
    const tooBig = text.replace(/[^0-9]/g, '').length > MAX_COEFFICIENT_DIGITS;
    if (!value || tooBig) {
      this.report(
        diagnostic(
          'bad-coefficient',
          tooBig ? `coefficient \`${tok.text}\` is too large to be meaningful` : `\`${tok.text}\` is not a coefficient; write an integer, decimal or fraction such as 2, 0.5 or 1/2`,
          tok.start,
          tok.end,
        ),
      );
      return undefined;
    }
    if (value.sign() <= 0) {
      this.report(
        diagnostic(
          'bad-coefficient',
          value.isZero()
            ? 'a coefficient of 0 removes the term; delete the term instead'
            : 'coefficients are positive; move the term to the other side of the arrow instead',
          tok.start,
          tok.end,
        ),
      );
      return undefined;
    }
    return value;
  }

  /**
   * A term or amount line's species: a declared name wins; otherwise the text is read as a
   * formula. Problems are reported on the token.
   */
  private resolveSpecies(tok: Token, phaseTok: Token | undefined): ResolvedSpecies | undefined {
    const writtenPhase = phaseTok ? this.readPhase(phaseTok) : undefined;
    const declared = this.species.get(tok.text);
    if (declared) {
      if (writtenPhase && declared.phase && writtenPhase !== declared.phase) {
        this.report(
          diagnostic(
            'phase-mismatch',
            `\`${declared.name}\` is declared as ${PHASE_NAMES[declared.phase]} (${declared.phase}) but written here as ${PHASE_NAMES[writtenPhase]} (${writtenPhase}); declare a separate species for the other phase`,
            phaseTok!.start,
            phaseTok!.end,
          ),
        );
      }
      if (!declared.formula) return undefined; // its declaration already has an error
      return { key: declared.name, declared, formula: declared.formula, phase: writtenPhase ?? declared.phase };
    }
    const r = this.formula(tok.text);
    const looksLikeName = IDENTIFIER.test(tok.text) && IDENTIFIER.exec(tok.text)![0].length === tok.text.length && /^[a-z_]/.test(tok.text);
    if (!r.ok && looksLikeName) {
      this.report(
        diagnostic(
          'unknown-species',
          `\`${tok.text}\` is not a declared species (and not a formula); declare it with \`species ${tok.text} = FORMULA (PHASE)\``,
          tok.start,
          tok.end,
        ),
      );
      return undefined;
    }
    for (const p of r.problems) {
      const d = this.formulaProblem(tok, p);
      if (d.code === 'unknown-element' && IDENTIFIER.test(tok.text) && IDENTIFIER.exec(tok.text)![0].length === tok.text.length) {
        this.report({ ...d, message: `${d.message} (or, if \`${tok.text}\` is a name, declare it with \`species ${tok.text} = FORMULA\`)` });
      } else if (d.code === 'ambiguous-charge') {
        this.report({ ...d, message: `${d.message}; the balance is checked once the charge is written unambiguously` });
      } else if (d.code === 'bad-formula' && /\+[A-Za-z0-9[(]/.test(tok.text)) {
        this.report({ ...d, message: `${d.message}; terms are separated by \` + \` with spaces on both sides` });
      } else {
        this.report(d);
      }
    }
    if (!r.ok) return undefined;
    return { key: tok.text, formula: r.formula, phase: writtenPhase };
  }

  private checkSameSpeciesBothSides(terms: readonly ReactionTerm[]): void {
    const left = new Map<string, ReactionTerm>();
    for (const t of terms) if (t.side === 'left' && t.species) left.set(speciesIdentity(t.species), t);
    for (const t of terms) {
      if (t.side !== 'right' || !t.species) continue;
      if (left.has(speciesIdentity(t.species))) {
        this.report(
          diagnostic(
            'same-species-both-sides',
            `\`${t.node.species.text}\` appears on both sides; cancel it out unless it is a catalyst you want recorded`,
            t.node.species.start,
            t.node.species.end,
          ),
        );
      }
    }
  }

  private checkDuplicateLabels(reactions: readonly ReactionModel[]): void {
    const seen = new Map<string, ReactionModel>();
    for (const r of reactions) {
      const prev = seen.get(r.label);
      if (prev) {
        const tok = r.node.label ?? r.node.arrow;
        const prevLine = lineOf(this.tree, (prev.node.label ?? prev.node.arrow).start);
        this.report(
          diagnostic(
            'duplicate-label',
            `the label \`${r.label}\` is already used on line ${prevLine}${prev.labelIsAuto ? ' (given automatically by position)' : ''}; labels must be unique`,
            tok.start,
            tok.end,
          ),
        );
      } else {
        seen.set(r.label, r);
      }
    }
  }

  // ---- batches --------------------------------------------------------------------------

  private batch(node: import('../syntax/tree').BatchNode, reactions: readonly ReactionModel[]): BatchModel {
    let temperature: number | undefined;
    if (node.temperature) {
      const t = readQuantity(node.temperature, ['temperature'], 'the batch temperature');
      for (const d of t.diagnostics) this.report(d);
      if (t.value !== undefined && t.value <= 0) {
        this.report(diagnostic('bad-quantity', 'temperature must be above absolute zero', node.temperature.start, node.temperature.end));
      } else {
        temperature = t.value;
      }
    }
    let pressure = STANDARD_ATMOSPHERE;
    let pressureIsDefault = true;
    if (node.pressure) {
      const p = readQuantity(node.pressure, ['pressure'], 'the batch pressure');
      for (const d of p.diagnostics) this.report(d);
      if (p.value !== undefined && p.value <= 0) {
        this.report(diagnostic('bad-quantity', 'pressure must be positive', node.pressure.start, node.pressure.end));
      } else if (p.value !== undefined) {
        pressure = p.value;
        pressureIsDefault = false;
      }
    }
    const props = readPropertyLines(node.properties, 'batch');
    for (const d of props.diagnostics) this.report(d);
    const vessel = this.positive(props.values.get('vessel')?.[0], 'the vessel volume');
    if (vessel !== undefined && node.pressure && !pressureIsDefault) {
      this.report(
        diagnostic(
          'unused-pressure',
          'in a closed vessel the pressure is computed from what is in it; this pressure is not used (give gases as partial pressures or amounts instead)',
          node.pressure.start,
          node.pressure.end,
        ),
      );
    }
    const volume = this.positive(props.values.get('volume')?.[0], 'the liquid volume');
    if (vessel !== undefined && volume !== undefined && volume >= vessel) {
      const v = props.values.get('volume')![0];
      this.report(diagnostic('bad-quantity', 'the liquid volume must be less than the vessel volume, leaving room for the gas', v.range.start, v.range.end));
    }
    const amounts: BatchAmount[] = [];
    const seen = new Map<string, BatchAmount>();
    const followOn = node.from !== undefined;
    const operations: BatchOperation[] = [];
    for (const line of node.properties) {
      if (line.type === 'operation') {
        if (!followOn) {
          const example = line.operation === 'vent' ? '' : '; in a batch of its own, list the amount as `SPECIES AMOUNT`';
          this.report(diagnostic('bad-operation', `\`${line.operation}\` belongs to a follow-on batch (\`batch NAME from OTHER\`)${example}`, line.keyword.start, line.keyword.end));
          continue;
        }
        operations.push(this.operation(line));
        continue;
      }
      if (line.type !== 'amount') continue;
      if (followOn) {
        this.report(
          diagnostic(
            'bad-operation',
            `a follow-on batch starts from its source's contents: write \`add ${line.species.text} …\` to charge more (or \`remove ${line.species.text} …\`)`,
            line.species.start,
            line.species.end,
          ),
        );
        continue;
      }
      const species = this.resolveSpecies(line.species, line.phase);
      let value: number | undefined;
      let dimension: BatchAmount['dimension'];
      if (line.value) {
        const q = readQuantity(line.value, ['amount', 'mass', 'volume', 'equivalents', 'concentration', 'pressure'], `the amount of \`${line.species.text}\``);
        for (const d of q.diagnostics) this.report(d);
        if (q.value !== undefined && q.value < 0) {
          this.report(diagnostic('bad-quantity', 'an amount cannot be negative (0 is allowed)', line.value.start, line.value.end));
        } else {
          value = q.value;
          dimension = q.dimension;
        }
      }
      const amount: BatchAmount = { node: line, species, value, dimension };
      if (species) {
        const id = speciesIdentity(species);
        if (seen.has(id)) {
          this.report(diagnostic('duplicate-property', `\`${line.species.text}\` is listed twice in this batch; give one total amount`, line.species.start, line.species.end));
          continue;
        }
        seen.set(id, amount);
      }
      amounts.push(amount);
    }
    let basis: string | undefined;
    let uses: ReactionModel[] | undefined;
    for (const line of node.properties) {
      if (line.type !== 'property') continue;
      if (line.keyText === 'basis' && line.names[0] && basis === undefined) {
        const tok = line.names[0];
        basis = tok.text;
        if (!followOn && !amounts.some((a) => a.node.species.text === tok.text)) {
          this.report(diagnostic('bad-basis', `the basis \`${tok.text}\` must be one of this batch's species with an amount`, tok.start, tok.end));
        }
      }
      if (line.keyText === 'uses' && uses === undefined) {
        uses = [];
        for (const tok of line.names) {
          const r = reactions.find((x) => x.label === tok.text);
          if (!r) {
            const labels = reactions.map((x) => `\`${x.label}\``).join(', ');
            this.report(diagnostic('unknown-label', `no reaction is labelled \`${tok.text}\`${labels ? `; labels in this notebook: ${labels}` : ''}`, tok.start, tok.end));
          } else {
            uses.push(r);
          }
        }
      }
    }
    this.checkEquivalents(amounts, basis);
    return {
      node,
      name: node.name?.text ?? '',
      temperature,
      pressure,
      pressureIsDefault,
      amounts,
      vessel,
      volume,
      basis,
      uses,
      heatCapacity: this.positive(props.values.get('heat capacity')?.[0], 'the heat capacity'),
      source: node.source?.text,
      operations,
    };
  }

  private operation(line: OperationNode): BatchOperation {
    const species = line.species ? this.resolveSpecies(line.species, line.phase) : undefined;
    if (!line.value) return { node: line, operation: line.operation, species };
    const expected: Dimension[] =
      line.operation === 'vent'
        ? ['pressure']
        : line.operation === 'add'
          ? ['amount', 'mass', 'volume', 'equivalents', 'concentration', 'pressure']
          : ['amount', 'mass', 'volume', 'percent'];
    const what = line.operation === 'vent' ? 'the pressure to vent to' : `the amount of \`${line.species?.text ?? ''}\` to ${line.operation}`;
    const q = readQuantity(line.value, expected, what);
    for (const d of q.diagnostics) this.report(d);
    if (q.value === undefined) return { node: line, operation: line.operation, species };
    if (line.operation === 'vent' ? q.value <= 0 : q.value < 0) {
      this.report(diagnostic('bad-quantity', line.operation === 'vent' ? 'the pressure to vent to must be positive' : 'an amount cannot be negative (0 is allowed)', line.value.start, line.value.end));
      return { node: line, operation: line.operation, species };
    }
    if (q.dimension === 'percent' && q.value > 1) {
      this.report(diagnostic('bad-quantity', 'at most 100 % of a species can be removed', line.value.start, line.value.end));
      return { node: line, operation: line.operation, species };
    }
    return { node: line, operation: line.operation, species, value: q.value, dimension: q.dimension };
  }

  /** Follow-on batches: the source must exist, and chains must not loop. */
  private checkSources(batches: readonly BatchModel[]): void {
    const byName = new Map<string, BatchModel>();
    for (const b of batches) if (b.node.name && !byName.has(b.name)) byName.set(b.name, b);
    for (const b of batches) {
      const tok = b.node.source;
      if (!tok || b.source === undefined) continue;
      if (!byName.has(b.source)) {
        const names = [...byName.keys()].filter((n) => n !== b.name).map((n) => `\`${n}\``).join(', ');
        this.report(diagnostic('unknown-batch', `no batch is named \`${b.source}\`${names ? `; batches in this notebook: ${names}` : ''}`, tok.start, tok.end));
        continue;
      }
      const chain = [b.name];
      let at: BatchModel | undefined = byName.get(b.source);
      while (at) {
        if (at === b || chain.includes(at.name)) {
          this.report(diagnostic('batch-cycle', `follow-on batches cannot start from each other in a loop: ${[...chain, at.name].map((n) => `\`${n}\``).join(' ← ')}`, tok.start, tok.end));
          break;
        }
        chain.push(at.name);
        at = at.source !== undefined ? byName.get(at.source) : undefined;
      }
    }
  }

  private positive(p: PropertyValue | undefined, what: string): number | undefined {
    if (!p) return undefined;
    if (p.value <= 0) {
      this.report(diagnostic('bad-quantity', `${what} must be positive`, p.range.start, p.range.end));
      return undefined;
    }
    return p.value;
  }

  private checkEquivalents(amounts: readonly BatchAmount[], basis: string | undefined): void {
    const equiv = amounts.filter((a) => a.dimension === 'equivalents');
    if (equiv.length === 0 || basis !== undefined) return;
    const absolute = amounts.find((a) => a.dimension !== undefined && a.dimension !== 'equivalents');
    if (!absolute) {
      for (const a of equiv) {
        this.report(
          diagnostic(
            'bad-basis',
            '`equiv` needs a species with an absolute amount (mol, g, mL, …) to be relative to; give one, or add `basis NAME`',
            (a.node.value ?? a.node.species).start,
            (a.node.value ?? a.node.species).end,
          ),
        );
      }
    }
  }

  private checkDuplicateBatches(batches: readonly BatchModel[]): void {
    const seen = new Map<string, BatchModel>();
    for (const b of batches) {
      if (!b.node.name) continue;
      const prev = seen.get(b.name);
      if (prev && prev.node.name) {
        this.report(
          diagnostic('duplicate-name', `batch \`${b.name}\` is already defined on line ${lineOf(this.tree, prev.node.name.start)}`, b.node.name.start, b.node.name.end),
        );
      } else {
        seen.set(b.name, b);
      }
    }
  }
}

/** Most balance solutions kept across analyses; older ones are dropped first. */
const BALANCE_CACHE_LIMIT = 5000;

/**
 * Memoises the balance of a reaction (tallies as written and the minimal balance) by a
 * canonical key: each term's side, coefficient and formula text (a formula's text fixes its
 * composition and charge). A reaction is then checked once per session however often it is
 * re-analysed or repeated in the notebook.
 */
export class BalanceCache {
  private readonly map = new Map<string, NonNullable<ReactionModel['balance']>>();

  balance(terms: readonly ReactionTerm[]): NonNullable<ReactionModel['balance']> {
    let key = '';
    for (const t of terms) key += `${t.side === 'left' ? '<' : '>'}${t.coefficient!.toString()} ${t.species!.formula.text}\u0000`;
    const hit = this.map.get(key);
    if (hit) return hit;
    const balanceTerms: BalanceTerm[] = terms.map((t) => ({
      composition: t.species!.formula.composition,
      charge: t.species!.formula.charge,
      side: t.side,
    }));
    const tally = tallyBalance(balanceTerms, terms.map((t) => t.coefficient!));
    const result = { tallies: tally.tallies, balanced: tally.balanced, solution: solveBalance(balanceTerms) };
    this.map.set(key, result);
    if (this.map.size > BALANCE_CACHE_LIMIT) this.map.delete(this.map.keys().next().value as string);
    return result;
  }
}

/** Coefficients with more digits than this are typos, not stoichiometry. */
const MAX_COEFFICIENT_DIGITS = 12;

/** Two references are the same species when they name the same declaration, or the same formula and phase. */
export function speciesIdentity(s: ResolvedSpecies): string {
  return s.declared ? `decl:${s.declared.name}` : `formula:${s.key}(${s.phase ?? ''})`;
}

/** 1-based line number of an offset, for messages (rare: only duplicate reports need it). */
function lineOf(tree: FileNode, offset: number): number {
  let line = 1;
  forEachToken(tree, (t) => {
    if (t.kind === 'newline' && t.end <= offset) line++;
  });
  return line;
}
