// Names and where they are used: species (declaration, terms, amount lines,
// `basis`), reaction labels (label, `uses`) and batch names. Definition,
// references, highlights and rename all read this one index.
import { IDENTIFIER, LABEL_NAME, RESERVED_WORDS } from '../syntax/parser';
import type { Token } from '../syntax/tree';
import type { Analysis } from './analysis';

export type NameKind = 'species' | 'label' | 'batch';

export interface NameOccurrence {
  readonly kind: NameKind;
  readonly name: string;
  readonly start: number;
  readonly end: number;
  readonly isDefinition: boolean;
}

/** Every occurrence of a declared name in the notebook, in source order. */
export function nameOccurrences(analysis: Analysis): NameOccurrence[] {
  const out: NameOccurrence[] = [];
  const { model } = analysis;
  const at = (kind: NameKind, tok: Token, isDefinition: boolean): void => {
    out.push({ kind, name: tok.text, start: tok.start, end: tok.end, isDefinition });
  };
  for (const s of analysis.syntax.tree.statements) {
    if (s.type === 'species' && s.name && model.species.get(s.name.text)?.node === s) at('species', s.name, true);
    if (s.type === 'reaction' && s.label) at('label', s.label, true);
    if (s.type === 'batch' && s.name) at('batch', s.name, true);
  }
  for (const r of model.reactions) {
    for (const t of r.terms) if (t.species?.declared) at('species', t.node.species, false);
  }
  for (const b of model.batches) {
    for (const a of b.amounts) if (a.species?.declared) at('species', a.node.species, false);
    for (const op of b.operations) if (op.species?.declared && op.node.species) at('species', op.node.species, false);
    if (b.node.source) at('batch', b.node.source, false);
    for (const line of b.node.properties) {
      if (line.type !== 'property') continue;
      if (line.keyText === 'uses') for (const n of line.names) at('label', n, false);
      if (line.keyText === 'basis') for (const n of line.names) if (model.species.has(n.text)) at('species', n, false);
    }
  }
  return out.sort((a, b) => a.start - b.start);
}

/** The occurrence under the cursor (a cursor just after a name counts). */
export function occurrenceAt(analysis: Analysis, offset: number): NameOccurrence | undefined {
  const all = nameOccurrences(analysis);
  return all.find((o) => o.start <= offset && offset < o.end) ?? all.find((o) => o.end === offset);
}

/** All occurrences of the same name of the same kind. */
export function sameName(analysis: Analysis, target: NameOccurrence): NameOccurrence[] {
  return nameOccurrences(analysis).filter((o) => o.kind === target.kind && o.name === target.name);
}

export interface Range {
  readonly start: number;
  readonly end: number;
}

export function definition(analysis: Analysis, offset: number): Range | undefined {
  const o = occurrenceAt(analysis, offset);
  if (!o) return undefined;
  return sameName(analysis, o).find((x) => x.isDefinition);
}

export function references(analysis: Analysis, offset: number, includeDeclaration: boolean): Range[] {
  const o = occurrenceAt(analysis, offset);
  if (!o) return [];
  return sameName(analysis, o).filter((x) => includeDeclaration || !x.isDefinition);
}

export interface Highlight extends Range {
  readonly write: boolean;
}

export function documentHighlights(analysis: Analysis, offset: number): Highlight[] {
  const o = occurrenceAt(analysis, offset);
  if (!o) return [];
  return sameName(analysis, o).map((x) => ({ start: x.start, end: x.end, write: x.isDefinition }));
}

export type RenameResult =
  | { readonly ok: true; readonly edits: readonly { start: number; end: number; newText: string }[] }
  | { readonly ok: false; readonly message: string };

/** The range that a rename at `offset` would change, when there is a name there. */
export function prepareRename(analysis: Analysis, offset: number): (Range & { readonly placeholder: string }) | undefined {
  const o = occurrenceAt(analysis, offset);
  if (!o) return undefined;
  return { start: o.start, end: o.end, placeholder: o.name };
}

/**
 * Renames a species, label or batch everywhere it is used. Refused, with the reason, when the
 * new name is not a valid name of its kind, is a keyword, or is already taken by another
 * name of the same kind (for species, also when a term would then read as that formula).
 */
export function rename(analysis: Analysis, offset: number, newName: string): RenameResult {
  const o = occurrenceAt(analysis, offset);
  if (!o) return { ok: false, message: 'there is no species, reaction label or batch name here to rename' };
  const pattern = o.kind === 'species' ? IDENTIFIER : LABEL_NAME;
  const match = pattern.exec(newName);
  if (!match || match[0].length !== newName.length) {
    return {
      ok: false,
      message:
        o.kind === 'species'
          ? `\`${newName}\` is not a valid species name: use letters, digits and \`_\`, not starting with a digit`
          : `\`${newName}\` is not a valid name: use letters, digits, \`_\` and \`-\`, not starting with a digit`,
    };
  }
  if (o.kind === 'species' && RESERVED_WORDS.has(newName)) return { ok: false, message: `\`${newName}\` is a keyword of the notebook` };
  if (newName !== o.name && nameOccurrences(analysis).some((x) => x.kind === o.kind && x.name === newName && x.isDefinition)) {
    return { ok: false, message: `a ${o.kind === 'label' ? 'reaction labelled' : o.kind === 'batch' ? 'batch named' : 'species named'} \`${newName}\` already exists` };
  }
  if (o.kind === 'label') {
    const auto = analysis.model.reactions.find((r) => r.labelIsAuto && r.label === newName);
    if (auto) return { ok: false, message: `\`${newName}\` is the automatic label of another reaction (by its position)` };
  }
  return { ok: true, edits: sameName(analysis, o).map((x) => ({ start: x.start, end: x.end, newText: newName })) };
}
