/**
 * Static reading of a JSON Logic expression: which facts it reads and which operators it uses.
 * The ruleset validator uses it to refuse a rule that reads a fact nobody asks for, and the
 * engine uses it to report the values a rule looked at.
 */
export interface LogicUsage {
  /** Literal `var` paths read from the fact object (outside `all`/`some`/`none`/`map`/`filter` bodies). */
  readonly vars: string[];
  /** Keys named by `missing` / `missing_some`. */
  readonly missingKeys: string[];
  /** Every operator used, including inside scoped bodies. */
  readonly operators: string[];
  /** Where a `var` path is itself computed, which static checks cannot follow. */
  readonly computedVarAt: string[];
}

const SCOPED = new Set(['all', 'some', 'none', 'map', 'filter', 'reduce']);

function isLogic(node: unknown): node is Record<string, unknown> {
  return typeof node === 'object' && node !== null && !Array.isArray(node) && Object.keys(node).length === 1;
}

/** Walk an expression once and list what it reads and uses. */
export function analyseLogic(logic: unknown): LogicUsage {
  const vars = new Set<string>();
  const missingKeys = new Set<string>();
  const operators = new Set<string>();
  const computedVarAt: string[] = [];

  const visit = (node: unknown, path: string, scoped: boolean): void => {
    if (Array.isArray(node)) {
      node.forEach((item, i) => visit(item, `${path}[${i}]`, scoped));
      return;
    }
    if (!isLogic(node)) return;
    const op = Object.keys(node)[0] as string;
    operators.add(op);
    const raw = node[op];
    const values: unknown[] = Array.isArray(raw) ? raw : [raw];
    if (op === 'var') {
      const target = values[0];
      if (typeof target === 'string' || typeof target === 'number') {
        if (!scoped && target !== '') vars.add(String(target));
      } else if (target !== undefined && target !== null) {
        computedVarAt.push(path);
      }
      values.slice(1).forEach((v, i) => visit(v, `${path}.var[${i + 1}]`, scoped));
      return;
    }
    if ((op === 'missing' || op === 'missing_some') && !scoped) {
      const keys = op === 'missing' ? (Array.isArray(values[0]) ? values[0] : values) : values[1];
      if (Array.isArray(keys)) for (const key of keys) if (typeof key === 'string') missingKeys.add(key);
    }
    if (SCOPED.has(op)) {
      visit(values[0], `${path}.${op}[0]`, scoped);
      values.slice(1).forEach((v, i) => visit(v, `${path}.${op}[${i + 1}]`, true));
      return;
    }
    values.forEach((v, i) => visit(v, `${path}.${op}[${i}]`, scoped));
  };

  visit(logic, '', false);
  return {
    vars: [...vars].sort(),
    missingKeys: [...missingKeys].sort(),
    operators: [...operators].sort(),
    computedVarAt,
  };
}
