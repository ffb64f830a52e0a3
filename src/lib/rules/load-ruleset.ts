/**
 * Reads a ruleset version file (or a stored jsonb document), validates it and pins its identity
 * as the SHA-256 of its canonical JSON, so a file, a database row and a report all agree on
 * which version scored a gate.
 */
import { contentSha256 } from './hash';
import { RulesetVersionSchema, type RulesetVersion } from './ruleset-schema';
import type { LoadedRuleset } from './engine';

/** One problem in a ruleset document, with the path of the field at fault (`rules[3].params.maxGapMm`). */
export interface RulesetProblem {
  path: string;
  message: string;
}

export class RulesetValidationError extends Error {
  readonly problems: RulesetProblem[];

  constructor(problems: RulesetProblem[], label = 'ruleset') {
    super(`The ${label} is not valid:\n${problems.map((p) => `  ${p.path}: ${p.message}`).join('\n')}`);
    this.name = 'RulesetValidationError';
    this.problems = problems;
  }
}

function formatPath(path: ReadonlyArray<PropertyKey>): string {
  let out = '';
  for (const part of path)
    out += typeof part === 'number' ? `[${part}]` : out ? `.${String(part)}` : String(part);
  return out || '(document)';
}

/** Validates without throwing: what the amendment editor shows beside each field. */
export function validateRuleset(
  json: unknown,
): { ok: true; ruleset: LoadedRuleset } | { ok: false; problems: RulesetProblem[] } {
  let document = json;
  if (typeof json === 'string') {
    try {
      document = JSON.parse(json);
    } catch (error) {
      return {
        ok: false,
        problems: [{ path: '(document)', message: `not JSON: ${(error as Error).message}` }],
      };
    }
  }
  const parsed = RulesetVersionSchema.safeParse(document);
  if (!parsed.success) {
    return {
      ok: false,
      problems: parsed.error.issues.map((issue) => ({
        path: formatPath(issue.path),
        message: issue.message,
      })),
    };
  }
  const version: RulesetVersion = parsed.data;
  return { ok: true, ruleset: { version, contentSha256: contentSha256(version) } };
}

/**
 * Validates a ruleset document (parsed JSON or its text) and returns the typed version with its
 * content SHA-256. Throws RulesetValidationError listing every problem with its path.
 */
export function loadRulesetFile(json: unknown, label?: string): LoadedRuleset {
  const result = validateRuleset(json);
  if (!result.ok) throw new RulesetValidationError(result.problems, label);
  return result.ruleset;
}
