/**
 * The common expressions in z read without building mathjs's parser (which costs about 100 ms of
 * process time, more than the rest of a `check`): numbers, z, + - * / ^, unary minus and plus,
 * parentheses and calls of the allowed functions, with mathjs's precedence (mathjs 15,
 * expression/parse.js: parseAddSubtract > parseMultiplyDivideModulus > parseUnary > parsePow, the
 * exponent read by parseUnary so that ^ is right-associative and "2^-3" is allowed; unary minus
 * binds looser than ^, so "-2^2" is -(2^2)). The tree has the shape of mathjs's nodes (type, op,
 * fn, args, name, value), so expressions.ts checks and compiles it with the same code.
 *
 * Anything else (another name, implicit multiplication, a number written "5." or "0x10", a blank
 * other than space or tab, an empty call, nesting deeper than MAX_DEPTH) gives undefined: mathjs
 * then reads the text and writes the error messages. test/survey/expressions-quick.test.ts
 * compares the trees with mathjs's over generated expressions.
 */

/** A node as mathjs would build it (only the fields expressions.ts reads). */
export interface QuickNode {
  type: 'ConstantNode' | 'SymbolNode' | 'OperatorNode' | 'FunctionNode' | 'ParenthesisNode';
  value?: number;
  name?: string;
  op?: string;
  fn?: string | QuickNode;
  implicit?: boolean;
  args?: QuickNode[];
  content?: QuickNode;
}

/** Deeper nesting goes to mathjs (which reports a stack overflow as nesting too deeply). */
const MAX_DEPTH = 64;

const TOKEN =
  /[ \t]*(?:(\d+(?:\.\d+)?(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)|([A-Za-z_][A-Za-z0-9_]*)|([-+*/^(),]))/y;

type Tok = { kind: 'num' | 'name' | 'punct'; text: string };

/** Signals a text the quick path leaves to mathjs. */
class NotQuick extends Error {}

function tokens(text: string): Tok[] | undefined {
  const out: Tok[] = [];
  let at = 0;
  for (;;) {
    // trailing blanks
    while (at < text.length && (text[at] === ' ' || text[at] === '\t')) at++;
    if (at >= text.length) return out;
    TOKEN.lastIndex = at;
    const m = TOKEN.exec(text);
    if (!m) return undefined;
    at = TOKEN.lastIndex;
    const next = text[at];
    if (m[1] !== undefined) {
      // "5.", "1e", "2.5.3", "0x10": not a plain decimal followed by a separator
      if (next !== undefined && /[.\w$]/.test(next)) return undefined;
      out.push({ kind: 'num', text: m[1] });
    } else if (m[2] !== undefined) {
      // a name followed by characters mathjs also reads as part of a name (non-ASCII letters, $)
      if (next !== undefined && !/[ \t\-+*/^(),]/.test(next)) return undefined;
      out.push({ kind: 'name', text: m[2] });
    } else out.push({ kind: 'punct', text: m[3]! });
  }
}

const FUNCTIONS = new Set(['log10', 'ln', 'exp', 'sqrt', 'abs', 'min', 'max']);
const ADD: Record<string, string> = { '+': 'add', '-': 'subtract' };
const MUL: Record<string, string> = { '*': 'multiply', '/': 'divide' };
const UNARY: Record<string, string> = { '-': 'unaryMinus', '+': 'unaryPlus' };

/** The node tree mathjs would build for `text`, or undefined to leave the text to mathjs. */
export function quickParse(text: string): QuickNode | undefined {
  const toks = tokens(text);
  if (!toks || toks.length === 0) return undefined;
  let i = 0;
  let depth = 0;
  const peek = (): Tok | undefined => toks[i];
  const isPunct = (t: Tok | undefined, p: string): boolean => t !== undefined && t.kind === 'punct' && t.text === p;

  const enter = (): void => {
    if (++depth > MAX_DEPTH) throw new NotQuick();
  };

  const addSubtract = (): QuickNode => {
    let node = multiplyDivide();
    for (let t = peek(); t?.kind === 'punct' && ADD[t.text]; t = peek()) {
      i++;
      node = { type: 'OperatorNode', op: t.text, fn: ADD[t.text], implicit: false, args: [node, multiplyDivide()] };
    }
    return node;
  };
  const multiplyDivide = (): QuickNode => {
    let node = unary();
    for (let t = peek(); t?.kind === 'punct' && MUL[t.text]; t = peek()) {
      i++;
      node = { type: 'OperatorNode', op: t.text, fn: MUL[t.text], implicit: false, args: [node, unary()] };
    }
    // a number, a name or "(" right after a factor: implicit multiplication (mathjs names it)
    const t = peek();
    if (t && (t.kind !== 'punct' || t.text === '(')) throw new NotQuick();
    return node;
  };
  const unary = (): QuickNode => {
    const t = peek();
    if (t?.kind === 'punct' && UNARY[t.text]) {
      i++;
      enter();
      const node: QuickNode = { type: 'OperatorNode', op: t.text, fn: UNARY[t.text], implicit: false, args: [unary()] };
      depth--;
      return node;
    }
    return pow();
  };
  const pow = (): QuickNode => {
    const base = primary();
    if (!isPunct(peek(), '^')) return base;
    i++;
    enter();
    const node: QuickNode = { type: 'OperatorNode', op: '^', fn: 'pow', implicit: false, args: [base, unary()] };
    depth--;
    return node;
  };
  const primary = (): QuickNode => {
    const t = peek();
    if (!t) throw new NotQuick();
    i++;
    if (t.kind === 'num') return { type: 'ConstantNode', value: Number(t.text) };
    if (t.kind === 'name') {
      const call = isPunct(peek(), '(');
      if (t.text === 'z' && !call) return { type: 'SymbolNode', name: 'z' };
      if (!call || !FUNCTIONS.has(t.text)) throw new NotQuick();
      i++;
      enter();
      const args = [addSubtract()];
      while (isPunct(peek(), ',')) {
        i++;
        args.push(addSubtract());
      }
      if (!isPunct(peek(), ')')) throw new NotQuick();
      i++;
      depth--;
      if (isPunct(peek(), '(')) throw new NotQuick();
      return { type: 'FunctionNode', fn: { type: 'SymbolNode', name: t.text }, args };
    }
    if (t.text !== '(') throw new NotQuick();
    enter();
    const content = addSubtract();
    if (!isPunct(peek(), ')')) throw new NotQuick();
    i++;
    depth--;
    if (isPunct(peek(), '(')) throw new NotQuick();
    return { type: 'ParenthesisNode', content };
  };

  try {
    const root = addSubtract();
    return i === toks.length ? root : undefined;
  } catch (e) {
    if (e instanceof NotQuick) return undefined;
    throw e;
  }
}
