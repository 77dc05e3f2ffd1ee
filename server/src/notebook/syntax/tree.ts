// The lossless syntax tree of a notebook: plain readonly interfaces told apart
// by `type`. Every character of the source belongs to exactly one token, notes
// and whitespace included, so the tokens of a file spell out its text again.
// Named fields on a node point at tokens or nodes that are also in `children`.

export type TokenKind =
  | 'whitespace'
  | 'newline'
  | 'comment'
  | 'keyword' // species, batch, at, and property keywords (K, density, vessel, ...)
  | 'name' // a declared name: species, batch, or a name used in a property value
  | 'label' // a reaction label (without its colon)
  | 'colon'
  | 'equals'
  | 'comma'
  | 'species-ref' // a term or amount line's species: a declared name or a formula (resolved later)
  | 'formula' // a formula in a species declaration
  | 'phase' // (g), (l), (s), (aq)
  | 'coefficient'
  | 'plus'
  | 'arrow'
  | 'number'
  | 'unit'
  | 'error'; // text the parser could not place

export interface Token {
  readonly type: 'token';
  readonly kind: TokenKind;
  readonly start: number;
  readonly end: number;
  readonly text: string;
}

export type SyntaxElement = Token | Node;

interface NodeBase {
  readonly start: number;
  readonly end: number;
  readonly children: readonly SyntaxElement[];
}

/** A number with an optional unit: `60 °C`, `1.0 mol`, `4.0`. */
export interface QuantityNode extends NodeBase {
  readonly type: 'quantity';
  readonly number: Token;
  readonly unit?: Token;
}

/** One term of a reaction side: `2 H2O(l)`, `1/2 O2 (g)`, `acid`. */
export interface TermNode extends NodeBase {
  readonly type: 'term';
  readonly coefficient?: Token;
  readonly species: Token;
  readonly phase?: Token;
}

/** An indented `KEY [=] VALUE [at TEMPERATURE]` line under a statement. */
export interface PropertyNode extends NodeBase {
  readonly type: 'property';
  /** One or two keyword tokens (`log K` is two). */
  readonly key: readonly Token[];
  readonly keyText: string;
  readonly equals?: Token;
  readonly value?: QuantityNode;
  /** For name-list properties (`basis acid`, `uses R1, R2`). */
  readonly names: readonly Token[];
  readonly at?: Token;
  readonly temperature?: QuantityNode;
}

/** An indented `SPECIES QUANTITY` line under a batch. */
export interface AmountNode extends NodeBase {
  readonly type: 'amount';
  readonly species: Token;
  readonly phase?: Token;
  readonly value?: QuantityNode;
}

/**
 * `vary VARIABLE from A to B [UNIT] step S` or `vary VARIABLE in A, B, C [UNIT]` under a batch:
 * a sweep of the batch over one variable (T, P, vessel, or a species amount).
 */
export interface SweepNode extends NodeBase {
  readonly type: 'sweep';
  readonly keyword: Token;
  readonly variable?: Token;
  /** `from` ... `to` ... `step` numbers, or the `in` list. */
  readonly from?: Token;
  readonly to?: Token;
  readonly step?: Token;
  readonly list: readonly Token[];
  readonly unit?: Token;
}

/**
 * `target conversion of SPECIES = X % by VARIABLE [from A to B UNIT]` (also `yield of PRODUCT`,
 * and `pressure = X bar`): the value of VARIABLE at which the batch meets a goal.
 */
export interface TargetNode extends NodeBase {
  readonly type: 'target';
  readonly keyword: Token;
  /** `conversion`, `yield` or `pressure`. */
  readonly goal?: Token;
  readonly species?: Token;
  readonly value?: QuantityNode;
  readonly variable?: Token;
  readonly from?: Token;
  readonly to?: Token;
  readonly unit?: Token;
}

/**
 * An operation line of a follow-on batch, applied to the source batch's contents in order:
 * `add SPECIES AMOUNT`, `remove SPECIES AMOUNT` (an amount or a percentage of what is there),
 * `vent` or `vent to PRESSURE` (a closed vessel's gas let down to 1 atm or the given pressure).
 */
export interface OperationNode extends NodeBase {
  readonly type: 'operation';
  readonly keyword: Token;
  /** 'add', 'remove' or 'vent' (the keyword's text). */
  readonly operation: 'add' | 'remove' | 'vent';
  readonly species?: Token;
  readonly phase?: Token;
  /** The amount added or removed, or the pressure after `vent to`. */
  readonly value?: QuantityNode;
  /** `to` of `vent to PRESSURE`. */
  readonly to?: Token;
}

export type PropertyLine = PropertyNode | AmountNode | SweepNode | TargetNode | OperationNode | ErrorLineNode;

/** `species NAME = FORMULA [(PHASE)]` with its property lines. */
export interface SpeciesNode extends NodeBase {
  readonly type: 'species';
  readonly keyword: Token;
  readonly name?: Token;
  readonly equals?: Token;
  readonly formula?: Token;
  readonly phase?: Token;
  readonly properties: readonly PropertyLine[];
}

/** `[LABEL:] SIDE ARROW SIDE` with its property lines. */
export interface ReactionNode extends NodeBase {
  readonly type: 'reaction';
  readonly label?: Token;
  readonly colon?: Token;
  readonly left: readonly TermNode[];
  readonly arrow: Token;
  readonly right: readonly TermNode[];
  readonly properties: readonly PropertyLine[];
}

/**
 * `batch NAME at TEMPERATURE[, PRESSURE]` with its amount and property lines, or a follow-on
 * batch `batch NAME from SOURCE [at TEMPERATURE[, PRESSURE]]` with its operation lines.
 */
export interface BatchNode extends NodeBase {
  readonly type: 'batch';
  readonly keyword: Token;
  readonly name?: Token;
  /** `from` of a follow-on batch, and the name of the batch it starts from. */
  readonly from?: Token;
  readonly source?: Token;
  readonly at?: Token;
  readonly temperature?: QuantityNode;
  readonly pressure?: QuantityNode;
  readonly properties: readonly PropertyLine[];
}

/** A line the parser could not read as anything; its text is kept as error tokens. */
export interface ErrorLineNode extends NodeBase {
  readonly type: 'error-line';
}

export type StatementNode = SpeciesNode | ReactionNode | BatchNode | ErrorLineNode;

export interface FileNode extends NodeBase {
  readonly type: 'file';
  readonly statements: readonly StatementNode[];
}

export type Node = FileNode | StatementNode | PropertyNode | AmountNode | SweepNode | TargetNode | OperationNode | TermNode | QuantityNode;

export interface SyntaxError {
  readonly code: 'syntax' | 'line-too-long';
  readonly message: string;
  readonly start: number;
  readonly end: number;
}

export interface ParseResult {
  readonly tree: FileNode;
  readonly errors: readonly SyntaxError[];
}

/** Calls `fn` for every token under `element`, in source order (iterative: trees can be large). */
export function forEachToken(element: SyntaxElement, fn: (token: Token) => void): void {
  const stack: SyntaxElement[] = [element];
  while (stack.length > 0) {
    const e = stack.pop()!;
    if (e.type === 'token') {
      fn(e);
      continue;
    }
    for (let i = e.children.length - 1; i >= 0; i--) stack.push(e.children[i]);
  }
}

/** All tokens under a node, in source order. */
export function tokensOf(element: SyntaxElement): Token[] {
  const out: Token[] = [];
  forEachToken(element, (t) => out.push(t));
  return out;
}

/** The token containing `offset` (the one ending at it when `offset` is at a boundary and no other starts there). */
export function tokenAt(root: SyntaxElement, offset: number): Token | undefined {
  let node: SyntaxElement = root;
  for (;;) {
    if (node.type === 'token') return node;
    let next: SyntaxElement | undefined;
    for (const child of node.children) {
      if (child.start <= offset && offset < child.end) {
        next = child;
        break;
      }
      if (child.end === offset && child.start < offset) next = child;
    }
    if (!next) return undefined;
    node = next;
  }
}

/** The chain of nodes from the root down to the innermost one containing `offset`. */
export function nodePathAt(root: FileNode, offset: number): Node[] {
  const path: Node[] = [root];
  let node: Node = root;
  for (;;) {
    let next: Node | undefined;
    for (const child of node.children) {
      if (child.type !== 'token' && child.start <= offset && offset <= child.end) {
        next = child;
        if (offset < child.end) break;
      }
    }
    if (!next) return path;
    path.push(next);
    node = next;
  }
}
