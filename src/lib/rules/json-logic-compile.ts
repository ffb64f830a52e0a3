import jsonLogic from 'json-logic-js';

/**
 * A JSON Logic expression compiled into a closure. Same answer as `jsonLogic.apply(logic, data)`
 * for every data value, without re-reading the expression tree on each call.
 */
export type CompiledLogic = (data: unknown) => unknown;

/** Options for {@link compileLogic}. */
export interface CompileOptions {
  /**
   * Values for `{"var": "<prefix>.<name>"}` known when compiling (a rule's params). Such vars
   * become constants, so one fact object serves every rule without copying params into it.
   * Only applied outside `all`/`some`/`none` bodies, where `var` reads the array element.
   */
  readonly constants?: { readonly prefix: string; readonly values: Readonly<Record<string, unknown>> };
}

/**
 * Operators the compiler turns into closures. Anything else (map, filter, reduce, substr, log,
 * operations added to json-logic-js at run time) is delegated to `jsonLogic.apply`, so the
 * meaning never drifts from the reference library.
 */
export const COMPILED_OPERATORS: ReadonlySet<string> = new Set([
  'var',
  'missing',
  'missing_some',
  '==',
  '===',
  '!=',
  '!==',
  '<',
  '<=',
  '>',
  '>=',
  'and',
  'or',
  '!',
  '!!',
  'if',
  '?:',
  'in',
  '+',
  '-',
  '*',
  '/',
  '%',
  'min',
  'max',
  'cat',
  'merge',
  'all',
  'some',
  'none',
]);

/** JSON Logic truthiness: like JavaScript, except an empty array is false. */
export function truthy(value: unknown): boolean {
  if (Array.isArray(value) && value.length === 0) return false;
  return !!value;
}

/**
 * Compile a JSON Logic expression once into a closure (no eval, no `new Function`). Call it for
 * each fact object; the result equals `jsonLogic.apply(logic, data)`.
 */
export function compileLogic(logic: unknown, options: CompileOptions = {}): CompiledLogic {
  return compileNode(logic, options.constants);
}

type Constants = CompileOptions['constants'];

function isLogic(node: unknown): node is Record<string, unknown> {
  return typeof node === 'object' && node !== null && !Array.isArray(node) && Object.keys(node).length === 1;
}

function compileNode(node: unknown, constants: Constants): CompiledLogic {
  if (Array.isArray(node)) {
    const items = node.map((item) => compileNode(item, constants));
    return (data) => items.map((item) => item(data));
  }
  if (!isLogic(node)) return () => node;
  const op = Object.keys(node)[0] as string;
  const raw = node[op];
  const values: unknown[] = Array.isArray(raw) ? raw : [raw];
  if (!COMPILED_OPERATORS.has(op)) return (data) => jsonLogic.apply(node as never, data);
  switch (op) {
    case 'var':
      return compileVar(values, constants);
    case 'if':
    case '?:':
      return compileIf(values.map((v) => compileNode(v, constants)));
    case 'and':
      return compileAndOr(
        values.map((v) => compileNode(v, constants)),
        false,
      );
    case 'or':
      return compileAndOr(
        values.map((v) => compileNode(v, constants)),
        true,
      );
    case 'all':
    case 'some':
    case 'none':
      return compileQuantifier(op, values, constants);
    default:
      return compileOperation(
        op,
        values.map((v) => compileNode(v, constants)),
      );
  }
}

/** `var` exactly as the reference: dotted path, default when absent, whole data for "" / null. */
export function readVar(data: unknown, path: unknown, fallback: unknown): unknown {
  const notFound = fallback === undefined ? null : fallback;
  if (typeof path === 'undefined' || path === '' || path === null) return data;
  const segments = String(path).split('.');
  let current: unknown = data;
  for (const segment of segments) {
    if (current === null || current === undefined) return notFound;
    current = (current as Record<string, unknown>)[segment];
    if (current === undefined) return notFound;
  }
  return current;
}

function compileVar(values: unknown[], constants: Constants): CompiledLogic {
  const [pathNode, fallbackNode] = values;
  const literalPath = typeof pathNode === 'string' || typeof pathNode === 'number';
  const literalFallback =
    fallbackNode === undefined || (!Array.isArray(fallbackNode) && !isLogic(fallbackNode));
  if (literalPath && literalFallback && values.length <= 2) {
    const path = String(pathNode);
    if (constants && path.startsWith(`${constants.prefix}.`)) {
      const name = path.slice(constants.prefix.length + 1);
      if (!name.includes('.') && Object.prototype.hasOwnProperty.call(constants.values, name)) {
        const constant = constants.values[name];
        if (constant !== undefined) return () => constant;
      }
    }
    if (path === '') return (data) => data;
    const segments = path.split('.');
    const notFound = fallbackNode === undefined ? null : fallbackNode;
    if (segments.length === 2) {
      const [first, second] = segments as [string, string];
      return (data) => {
        if (data === null || data === undefined) return notFound;
        const outer = (data as Record<string, unknown>)[first];
        if (outer === undefined) return notFound;
        if (outer === null) return notFound;
        const inner = (outer as Record<string, unknown>)[second];
        return inner === undefined ? notFound : inner;
      };
    }
    if (segments.length === 3) {
      const [first, second, third] = segments as [string, string, string];
      return (data) => {
        if (data === null || data === undefined) return notFound;
        const a = (data as Record<string, unknown>)[first];
        if (a === undefined || a === null) return notFound;
        const b = (a as Record<string, unknown>)[second];
        if (b === undefined || b === null) return notFound;
        const c = (b as Record<string, unknown>)[third];
        return c === undefined ? notFound : c;
      };
    }
    return (data) => {
      let current: unknown = data;
      for (const segment of segments) {
        if (current === null || current === undefined) return notFound;
        current = (current as Record<string, unknown>)[segment];
        if (current === undefined) return notFound;
      }
      return current;
    };
  }
  const args = values.map((v) => compileNode(v, constants));
  return (data) => {
    const evaluated = args.map((arg) => arg(data));
    return readVar(data, evaluated[0], evaluated[1]);
  };
}

function compileIf(branches: CompiledLogic[]): CompiledLogic {
  return (data) => {
    let i = 0;
    for (; i < branches.length - 1; i += 2) {
      if (truthy((branches[i] as CompiledLogic)(data))) return (branches[i + 1] as CompiledLogic)(data);
    }
    if (branches.length === i + 1) return (branches[i] as CompiledLogic)(data);
    return null;
  };
}

function compileAndOr(items: CompiledLogic[], isOr: boolean): CompiledLogic {
  if (items.length === 2) {
    const [first, second] = items as [CompiledLogic, CompiledLogic];
    return isOr
      ? (data) => {
          const a = first(data);
          return truthy(a) ? a : second(data);
        }
      : (data) => {
          const a = first(data);
          return truthy(a) ? second(data) : a;
        };
  }
  return (data) => {
    let current: unknown = undefined;
    for (const item of items) {
      current = item(data);
      if (truthy(current) === isOr) return current;
    }
    return current;
  };
}

function compileQuantifier(op: string, values: unknown[], constants: Constants): CompiledLogic {
  const source = compileNode(values[0], constants);
  // Inside the body `var` reads the element, so params are not substituted there.
  const body = compileNode(values[1], undefined);
  return (data) => {
    const scoped = source(data);
    if (!Array.isArray(scoped) || scoped.length === 0) return op === 'none';
    for (const element of scoped) {
      const hit = truthy(body(element));
      if (op === 'all' && !hit) return false;
      if (op === 'some' && hit) return true;
      if (op === 'none' && hit) return false;
    }
    return op !== 'some';
  };
}

type Operation = (data: unknown, args: unknown[]) => unknown;

const pf = (value: unknown): number => parseFloat(value as string);

/** The reference library's operation bodies, written out so the compiled closures share them. */
const OPERATIONS: Record<string, Operation> = {
  '==': (_d, [a, b]) => a == b,
  '===': (_d, [a, b]) => a === b,
  '!=': (_d, [a, b]) => a != b,
  '!==': (_d, [a, b]) => a !== b,
  '>': (_d, [a, b]) => (a as number) > (b as number),
  '>=': (_d, [a, b]) => (a as number) >= (b as number),
  '<': (_d, [a, b, c]) =>
    c === undefined
      ? (a as number) < (b as number)
      : (a as number) < (b as number) && (b as number) < (c as number),
  '<=': (_d, [a, b, c]) =>
    c === undefined
      ? (a as number) <= (b as number)
      : (a as number) <= (b as number) && (b as number) <= (c as number),
  '!!': (_d, [a]) => truthy(a),
  '!': (_d, [a]) => !truthy(a),
  '%': (_d, [a, b]) => (a as number) % (b as number),
  in: (_d, [a, b]) => {
    if (!b || typeof (b as { indexOf?: unknown }).indexOf === 'undefined') return false;
    return (b as { indexOf(x: unknown): number }).indexOf(a) !== -1;
  },
  cat: (_d, args) => args.join(''),
  '+': (_d, args) => args.reduce<number>((sum, next) => pf(sum) + pf(next), 0),
  '*': (_d, args) => {
    if (args.length === 0) throw new TypeError('Reduce of empty array with no initial value');
    return args.reduce((product, next) => pf(product) * pf(next));
  },
  '-': (_d, [a, b]) => (b === undefined ? -(a as number) : (a as number) - (b as number)),
  '/': (_d, [a, b]) => (a as number) / (b as number),
  min: (_d, args) => Math.min(...(args as number[])),
  max: (_d, args) => Math.max(...(args as number[])),
  merge: (_d, args) => args.reduce<unknown[]>((all, next) => all.concat(next), []),
  missing: (data, args) => {
    const keys = Array.isArray(args[0]) ? (args[0] as unknown[]) : args;
    const missing: unknown[] = [];
    for (const key of keys) {
      const value = readVar(data, key, undefined);
      if (value === null || value === '') missing.push(key);
    }
    return missing;
  },
  missing_some: (data, [needCount, options]) => {
    const missing = OPERATIONS.missing!(data, [options]) as unknown[];
    return (options as unknown[]).length - missing.length >= (needCount as number) ? [] : missing;
  },
};

const BINARY_FAST: Record<string, (a: unknown, b: unknown) => unknown> = {
  '==': (a, b) => a == b,
  '===': (a, b) => a === b,
  '!=': (a, b) => a != b,
  '!==': (a, b) => a !== b,
  '>': (a, b) => (a as number) > (b as number),
  '>=': (a, b) => (a as number) >= (b as number),
  '<': (a, b) => (a as number) < (b as number),
  '<=': (a, b) => (a as number) <= (b as number),
  '/': (a, b) => (a as number) / (b as number),
};

function compileOperation(op: string, args: CompiledLogic[]): CompiledLogic {
  const fast = BINARY_FAST[op];
  if (fast && args.length === 2) {
    const [left, right] = args as [CompiledLogic, CompiledLogic];
    // Left then right, the order the reference evaluates arguments in.
    return (data) => fast(left(data), right(data));
  }
  if (op === '-' && args.length === 2) {
    const [left, right] = args as [CompiledLogic, CompiledLogic];
    return (data) => {
      const a = left(data);
      const b = right(data);
      return b === undefined ? -(a as number) : (a as number) - (b as number);
    };
  }
  if ((op === '!' || op === '!!') && args.length === 1) {
    const [only] = args as [CompiledLogic];
    return op === '!' ? (data) => !truthy(only(data)) : (data) => truthy(only(data));
  }
  const operation = OPERATIONS[op] as Operation;
  return (data) =>
    operation(
      data,
      args.map((arg) => arg(data)),
    );
}
