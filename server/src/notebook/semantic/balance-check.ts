// Element and charge balance diagnostics for one reaction, and the quick fix
// that rewrites the equation with the smallest whole-number coefficients.
import type { ElementTally } from '../../chem/balance';
import { diagnostic, type Diagnostic, type Fix } from './codes';
import type { ReactionModel } from './model';

export function balanceDiagnostics(reaction: ReactionModel): Diagnostic[] {
  const balance = reaction.balance;
  if (!balance) return [];
  const { equationStart: start, equationEnd: end } = reaction;
  const out: Diagnostic[] = [];
  const solution = balance.solution;
  if (!balance.balanced) {
    const fixes: Fix[] = [];
    if (solution.kind === 'unique') {
      const newText = rewriteEquation(reaction, solution.coefficients);
      fixes.push({
        title: `Balance: ${newText}`,
        edits: [{ start, end, newText }],
        preferred: true,
      });
    }
    const off = balance.tallies.filter((t) => !t.left.equals(t.right));
    const elements = off.filter((t) => t.element !== 'charge');
    const charge = off.find((t) => t.element === 'charge');
    if (elements.length > 0) {
      out.push(
        diagnostic(
          'unbalanced-elements',
          `elements do not balance: ${elements.map(describeTally).join('; ')}`,
          start,
          end,
          fixes,
        ),
      );
    }
    if (charge) {
      out.push(
        diagnostic(
          'unbalanced-charge',
          `charge does not balance: ${formatCharge(charge.left.toString())} left, ${formatCharge(charge.right.toString())} right`,
          start,
          end,
          elements.length > 0 ? [] : fixes,
        ),
      );
    }
    if (solution.kind === 'none') {
      out.push(diagnostic('no-balance', `no positive coefficients balance this equation: ${solution.reason}`, start, end));
    } else if (solution.kind === 'several') {
      out.push(
        diagnostic(
          'several-balances',
          `several independent balances exist (${solution.dimension}): element and charge balance do not fix the coefficients, so no single fix is offered; write the coefficients you mean, or split it into separate reactions`,
          start,
          end,
        ),
      );
    }
  }
  return out;
}

export function describeTally(t: ElementTally): string {
  return `${t.element}: ${t.left.toString()} left, ${t.right.toString()} right`;
}

function formatCharge(text: string): string {
  return text.startsWith('-') || text === '0' ? text : `+${text}`;
}

/**
 * The equation text with new coefficients: each term keeps its species and phase exactly as
 * written; a coefficient of 1 is left out; terms are joined by ` + ` around the written arrow.
 */
export function rewriteEquation(reaction: ReactionModel, coefficients: readonly bigint[]): string {
  const side = (which: 'left' | 'right'): string =>
    reaction.terms
      .map((t, i) => ({ t, c: coefficients[i] }))
      .filter(({ t }) => t.side === which)
      .map(({ t, c }) => {
        const species = t.node.species;
        const body = t.node.phase ? textBetween(t.node.children, species.start, t.node.phase.end) : species.text;
        return c === 1n ? body : `${c.toString()} ${body}`;
      })
      .join(' + ');
  return `${side('left')} ${reaction.node.arrow.text} ${side('right')}`;
}

function textBetween(children: ReactionModel['terms'][number]['node']['children'], start: number, end: number): string {
  let s = '';
  for (const c of children) {
    if (c.type === 'token' && c.start >= start && c.end <= end) s += c.text;
  }
  return s;
}
