/**
 * A gap model written as a formula in the composition x, e.g.
 * "1.57 + 0.39*x + 0.33*x^2" [eV]. mathjs parses it (no eval); only numbers,
 * the variable x, + − × ÷ (by a constant), powers with whole non-negative
 * exponents and parentheses are accepted, so every formula is a polynomial and
 * the family's inversion (gap → compositions) stays exact. Loaded only where a
 * family gives a formula (mathjs is heavy).
 */
import { parse, type MathNode } from 'mathjs';
import { UserError } from '../errors.js';

/** Highest power accepted [-]; real gap fits use 2 or 3. */
const MAX_DEGREE = 8;

type Poly = number[];

const add = (a: Poly, b: Poly, sign = 1): Poly => Array.from({ length: Math.max(a.length, b.length) }, (_, k) => (a[k] ?? 0) + sign * (b[k] ?? 0));
function mul(a: Poly, b: Poly): Poly {
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  a.forEach((x, i) => b.forEach((y, j) => (out[i + j] += x * y)));
  return out;
}
const trim = (p: Poly): Poly => {
  const c = [...p];
  while (c.length > 1 && c[c.length - 1] === 0) c.pop();
  return c;
};
const isConstant = (p: Poly) => trim(p).length === 1;

/**
 * Ascending polynomial coefficients [eV] of a gap formula in x.
 * @param text the formula, e.g. "1.57 + 0.39*x + 0.33*x^2"
 * @param where location for messages, e.g. "materials[0].gap_formula"
 * @throws UserError naming the offending token
 */
export function polynomialFromFormula(text: string, where: string): number[] {
  let root: MathNode;
  try {
    root = parse(text);
  } catch (err) {
    throw new UserError(`${where}: cannot read "${text}": ${(err as Error).message}`);
  }
  const bad = (node: MathNode, why: string): never => {
    throw new UserError(`${where}: "${node.toString()}" ${why}; a gap formula uses numbers, x, + - * /, ^ with whole exponents and parentheses`);
  };
  const walk = (node: MathNode): Poly => {
    const n = node as MathNode & { type: string; op?: string; fn?: string; args?: MathNode[]; name?: string; value?: unknown; content?: MathNode };
    switch (n.type) {
      case 'ConstantNode':
        if (typeof n.value !== 'number' || !Number.isFinite(n.value)) return bad(node, 'is not a finite number');
        return [n.value];
      case 'SymbolNode':
        if (n.name !== 'x') return bad(node, 'is not the composition variable x');
        return [0, 1];
      case 'ParenthesisNode':
        return walk(n.content as MathNode);
      case 'OperatorNode': {
        const args = (n.args ?? []).map(walk);
        if (n.fn === 'unaryMinus') return args[0].map((c) => -c);
        if (n.fn === 'unaryPlus') return args[0];
        if (n.fn === 'add') return add(args[0], args[1]);
        if (n.fn === 'subtract') return add(args[0], args[1], -1);
        if (n.fn === 'multiply') return mul(args[0], args[1]);
        if (n.fn === 'divide') {
          if (!isConstant(args[1]) || args[1][0] === 0) return bad((n.args as MathNode[])[1], 'is not a non-zero constant (divide only by numbers)');
          return args[0].map((c) => c / args[1][0]);
        }
        if (n.fn === 'pow') {
          const e = trim(args[1]);
          if (e.length !== 1 || !Number.isInteger(e[0]) || e[0] < 0 || e[0] > MAX_DEGREE) return bad((n.args as MathNode[])[1], `is not a whole exponent from 0 to ${MAX_DEGREE}`);
          let out: Poly = [1];
          for (let k = 0; k < e[0]; k++) out = mul(out, args[0]);
          return out;
        }
        return bad(node, `uses the operator "${n.op ?? n.fn}"`);
      }
      default:
        return bad(node, n.type === 'FunctionNode' ? 'calls a function' : n.type === 'AssignmentNode' || n.type === 'FunctionAssignmentNode' ? 'assigns' : `is not allowed (${n.type})`);
    }
  };
  const coeffs = trim(walk(root));
  if (coeffs.length - 1 > MAX_DEGREE) throw new UserError(`${where}: "${text}" has degree ${coeffs.length - 1}; at most ${MAX_DEGREE}`);
  return coeffs;
}
