/** Family and version taken from a URL: anything that is not a valid slug or label names nothing (404). */
import { FamilySlugSchema, VersionLabelSchema } from '@/lib/api/rulesets';
import { HttpProblem } from './problem';

const notFound = () => new HttpProblem(404, 'That ruleset version was not found.');

export function familyFromPath(value: string | undefined): string {
  const parsed = FamilySlugSchema.safeParse(value);
  if (!parsed.success) throw notFound();
  return parsed.data;
}

export function versionFromPath(params: Record<string, string | undefined>): {
  family: string;
  version: string;
} {
  const family = familyFromPath(params.family);
  const parsed = VersionLabelSchema.safeParse(params.version);
  if (!parsed.success) throw notFound();
  return { family, version: parsed.data };
}
