// Semantic tokens: what each piece of a notebook is, from the analysis rather
// than from patterns, so themes colour a declared name as a name and a formula
// as a formula (with its element symbols, counts, charges and phases apart).
import type { Token } from '../syntax/tree';
import { forEachToken } from '../syntax/tree';
import type { Analysis } from './analysis';

/** The token types we report, in legend order (standard LSP type names, so themes know them). */
export const SEMANTIC_TOKEN_TYPES = [
  'keyword', // species, batch, at
  'property', // property keywords: K, density, vessel, ...
  'variable', // declared species names
  'function', // reaction labels
  'struct', // batch names
  'type', // element symbols inside formulas
  'number', // numbers, coefficients, subscripts
  'operator', // arrows, +, =, charges
  'enumMember', // units
  'modifier', // phases
  'comment', // notes
] as const;

export const SEMANTIC_TOKEN_MODIFIERS = ['declaration', 'readonly'] as const;

export type SemanticTokenType = (typeof SEMANTIC_TOKEN_TYPES)[number];

export interface SemanticToken {
  readonly start: number;
  readonly length: number;
  readonly type: SemanticTokenType;
  readonly declaration: boolean;
}

const FORMULA_PART = /([A-Z][a-z]?)|([0-9₀-₉]+)|(\^?[0-9⁰-⁹]*[+\-−⁺⁻]+[0-9]*)|([()[\]·•*.])/g;

/** A formula's text split into element symbols, counts and charges. */
function formulaPieces(tok: Token, out: SemanticToken[]): void {
  const text = tok.text;
  if (text === 'e-' || text === 'e^-' || text === 'e⁻' || text === 'e−') {
    out.push({ start: tok.start, length: text.length, type: 'operator', declaration: false });
    return;
  }
  FORMULA_PART.lastIndex = 0;
  for (let m = FORMULA_PART.exec(text); m; m = FORMULA_PART.exec(text)) {
    const type: SemanticTokenType | undefined = m[1] ? 'type' : m[2] ? 'number' : m[3] ? 'operator' : undefined;
    if (type) out.push({ start: tok.start + m.index, length: m[0].length, type, declaration: false });
  }
}

export function semanticTokens(analysis: Analysis): SemanticToken[] {
  const out: SemanticToken[] = [];
  const declared = analysis.model.species;
  forEachToken(analysis.syntax.tree, (t) => {
    const length = t.end - t.start;
    const push = (type: SemanticTokenType, declaration = false): void => {
      out.push({ start: t.start, length, type, declaration });
    };
    switch (t.kind) {
      case 'keyword':
        push(t.text === 'species' || t.text === 'batch' || t.text === 'at' || t.text === 'from' ? 'keyword' : 'property');
        break;
      case 'name':
        // A species declaration's name, a batch name, or a name in `basis` / `uses`.
        push(declared.has(t.text) ? 'variable' : analysis.model.reactions.some((r) => r.label === t.text) ? 'function' : 'struct', isDeclaration(analysis, t));
        break;
      case 'label':
        push('function', true);
        break;
      case 'species-ref':
        if (declared.has(t.text)) push('variable');
        else formulaPieces(t, out);
        break;
      case 'formula':
        formulaPieces(t, out);
        break;
      case 'phase':
        push('modifier');
        break;
      case 'coefficient':
      case 'number':
        push('number');
        break;
      case 'arrow':
      case 'plus':
      case 'equals':
        push('operator');
        break;
      case 'unit':
        push('enumMember');
        break;
      case 'comment':
        push('comment');
        break;
      default:
        break;
    }
  });
  return out;
}

function isDeclaration(analysis: Analysis, t: Token): boolean {
  const s = analysis.statementAt(t.start);
  if (!s) return false;
  const node = s.node;
  return (node.type === 'species' || node.type === 'batch') && node.name === t;
}
