import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// common practice, no source: a calculator nothing calls keeps a second copy of thresholds the
// ruleset already holds, and drifts from it. Every calculator module must be reached from the
// product's own code (not only from tests or the calculators' index).

const SRC = fileURLToPath(new URL('../../../src', import.meta.url));
const CALCULATORS = join(SRC, 'lib/rules/calculators');

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return /\.(ts|tsx|astro)$/.test(entry.name) ? [path] : [];
  });
}

/** Calculator modules (by file name without extension) a file imports. */
function calculatorImports(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const names: string[] = [];
  for (const match of text.matchAll(/from\s+['"]([^'"]+)['"]/g)) {
    const spec = match[1]!;
    // Outside the folder a calculator is imported by a path through `calculators/`; inside it, as `./name`.
    const found = file.startsWith(CALCULATORS)
      ? /^\.\/([a-z0-9-]+)$/.exec(spec)
      : /calculators\/([a-z0-9-]+)$/.exec(spec);
    if (found) names.push(found[1]!);
  }
  return names;
}

describe('calculators', () => {
  it('are each reached from the product’s code, so no threshold lives twice', () => {
    const modules = readdirSync(CALCULATORS)
      .filter((f) => f.endsWith('.ts') && f !== 'index.ts')
      .map((f) => f.replace(/\.ts$/, ''));
    const reached = new Set<string>();
    const queue: string[] = [];
    for (const file of sourceFiles(SRC)) {
      if (file.startsWith(CALCULATORS)) continue;
      for (const name of calculatorImports(file))
        if (!reached.has(name)) (reached.add(name), queue.push(name));
    }
    while (queue.length > 0) {
      const name = queue.pop()!;
      for (const next of calculatorImports(join(CALCULATORS, `${name}.ts`)))
        if (!reached.has(next)) (reached.add(next), queue.push(next));
    }
    const unreached = modules.filter((m) => !reached.has(m)).map((m) => relative(SRC, join(CALCULATORS, m)));
    expect(unreached).toEqual([]);
  });
});
