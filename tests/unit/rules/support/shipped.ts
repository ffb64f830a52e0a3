/**
 * The ruleset files shipped in rulesets/, loaded and validated once for the tests and the bench.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadRulesetFile, type LoadedRuleset } from '@/lib/rules';

export const RULESETS_DIR = fileURLToPath(new URL('../../../../rulesets', import.meta.url));

export interface ShippedRuleset extends LoadedRuleset {
  file: string;
}

/** Every `rulesets/<family>/<version>.json`, sorted by path. */
export function shippedRulesetFiles(): string[] {
  const files: string[] = [];
  for (const family of readdirSync(RULESETS_DIR, { withFileTypes: true })) {
    if (!family.isDirectory()) continue;
    for (const file of readdirSync(join(RULESETS_DIR, family.name))) {
      if (file.endsWith('.json')) files.push(join(RULESETS_DIR, family.name, file));
    }
  }
  return files.sort();
}

let cache: ShippedRuleset[] | null = null;

export function shippedRulesets(): ShippedRuleset[] {
  cache ??= shippedRulesetFiles().map((file) => ({
    file: relative(RULESETS_DIR, file),
    ...loadRulesetFile(readFileSync(file, 'utf8'), file),
  }));
  return cache;
}

export function shipped(family: string, version: string): ShippedRuleset {
  const found = shippedRulesets().find((r) => r.version.family === family && r.version.version === version);
  if (!found) throw new Error(`No shipped ruleset ${family} ${version}`);
  return found;
}
