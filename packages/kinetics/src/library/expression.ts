import { all, create, type MathNode } from 'mathjs';
import { EngineError } from '../errors';

/**
 * Restricted evaluation of covariate relations with mathjs, so an admin can add a model as data.
 *
 * Two independent guards (mathjs "Security" documentation, https://mathjs.org/docs/expressions/security.html):
 * 1. A private mathjs instance whose dangerous functions are overridden to throw: import, createUnit,
 *    reviver, evaluate, parse, simplify, derivative, resolve, compile (we keep our own references first).
 * 2. An allow-list over the parsed syntax tree: numbers, named symbols (the declared covariates and `THETA`),
 *    parentheses, the operators + − * / ^ (and unary ±), and calls to pow, exp, log, min, max, sqrt, abs.
 *    Anything else (assignment, function definition, property access, matrices, strings, units, other
 *    functions) is refused before evaluation. Evaluation scope is a Map holding only the named values.
 */
const math = create(all as NonNullable<typeof all>);
const parseExpression = math.parse;
const disabled = (name: string) => () => {
  throw new Error(`${name} is disabled in covariate expressions`);
};
math.import(
  {
    import: disabled('import'),
    createUnit: disabled('createUnit'),
    reviver: disabled('reviver'),
    evaluate: disabled('evaluate'),
    parse: disabled('parse'),
    simplify: disabled('simplify'),
    derivative: disabled('derivative'),
    resolve: disabled('resolve'),
    compile: disabled('compile'),
  },
  { override: true },
);

/** Functions a covariate relation may call. */
export const ALLOWED_FUNCTIONS: readonly string[] = Object.freeze([
  'pow',
  'exp',
  'log',
  'min',
  'max',
  'sqrt',
  'abs',
]);
const ALLOWED_OPERATORS = new Set(['+', '-', '*', '/', '^']);
const SYMBOL_PATTERN = /^[A-Za-z][A-Za-z0-9_]*$/;

/** A covariate relation checked against the allow-list and ready to evaluate. */
export interface CompiledExpression {
  readonly source: string;
  /** Symbols the expression reads (covariates and/or THETA). */
  readonly symbols: readonly string[];
  evaluate(scope: Readonly<Record<string, number>>): number;
}

function check(node: MathNode, symbols: Set<string>, fn: string, field: string): void {
  const fail = (what: string): never => {
    throw new EngineError('invalid-expression', `${fn}: ${field}: ${what} is not allowed`, field);
  };
  const n = node as MathNode & {
    type: string;
    value?: unknown;
    name?: string;
    op?: string;
    fn?: MathNode & { type: string; name?: string };
    args?: MathNode[];
    content?: MathNode;
  };
  switch (n.type) {
    case 'ConstantNode':
      if (typeof n.value !== 'number' || !Number.isFinite(n.value))
        fail(`constant ${String(n.value)}`);
      return;
    case 'SymbolNode':
      if (!n.name || !SYMBOL_PATTERN.test(n.name) || ALLOWED_FUNCTIONS.includes(n.name)) {
        fail(`symbol ${String(n.name)}`);
      }
      symbols.add(n.name as string);
      return;
    case 'ParenthesisNode':
      check(n.content as MathNode, symbols, fn, field);
      return;
    case 'OperatorNode':
      if (!n.op || !ALLOWED_OPERATORS.has(n.op)) fail(`operator ${String(n.op)}`);
      for (const a of n.args ?? []) check(a, symbols, fn, field);
      return;
    case 'FunctionNode': {
      const name = n.fn?.type === 'SymbolNode' ? n.fn.name : undefined;
      if (!name || !ALLOWED_FUNCTIONS.includes(name))
        fail(`function ${String(name ?? '(computed)')}`);
      for (const a of n.args ?? []) check(a, symbols, fn, field);
      return;
    }
    default:
      fail(n.type);
  }
}

/**
 * Parse and allow-list a covariate relation, e.g. `THETA * (CRCL / 120)^0.8 * 0.7^HD`.
 * @throws {EngineError} `invalid-expression` naming `field` for syntax errors or anything not allowed.
 * @example compileCovariateExpression('THETA * (WT / 70)').evaluate({ THETA: 58.4, WT: 80 }) // => 66.74
 */
export function compileCovariateExpression(
  source: string,
  field = 'expression',
  fn = 'compileCovariateExpression',
): CompiledExpression {
  if (typeof source !== 'string' || source.trim() === '' || source.length > 500) {
    throw new EngineError(
      'invalid-expression',
      `${fn}: ${field} must be a non-empty string of at most 500 characters`,
      field,
    );
  }
  let tree: MathNode;
  try {
    tree = parseExpression(source);
  } catch (e) {
    throw new EngineError(
      'invalid-expression',
      `${fn}: ${field} does not parse: ${(e as Error).message}`,
      field,
    );
  }
  const symbols = new Set<string>();
  check(tree, symbols, fn, field);
  const compiled = tree.compile();
  const names = [...symbols];
  return {
    source,
    symbols: names,
    evaluate(scope) {
      const map = new Map<string, number>();
      for (const s of names) {
        const v = scope[s];
        if (typeof v !== 'number' || !Number.isFinite(v)) {
          throw new EngineError(
            'invalid-input',
            `${fn}: ${field} needs a finite value for ${s} (got ${String(v)})`,
            s,
          );
        }
        map.set(s, v);
      }
      const r: unknown = compiled.evaluate(map);
      if (typeof r !== 'number' || !Number.isFinite(r)) {
        throw new EngineError(
          'invalid-expression',
          `${fn}: ${field} did not evaluate to a finite number (got ${String(r)})`,
          field,
        );
      }
      return r;
    },
  };
}
