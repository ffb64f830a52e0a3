/**
 * Loaded ruleset versions kept in process memory by content SHA-256, so a scoring preview costs
 * one small query (which version is current) and no jsonb transfer, parsing or compiling.
 * Content-addressed: a draft edited into new content simply has a new key, and nothing ever
 * needs invalidating. Bounded, least recently used out first.
 */
import { loadRulesetFile, type LoadedRuleset } from '@/lib/rules';

const CAPACITY = 32;
const entries = new Map<string, Promise<LoadedRuleset>>();

/**
 * The version whose content hashes to `contentSha256`, reading it with `readContent` on a miss.
 * Stored content that no longer hashes to its recorded SHA-256 is refused, never scored.
 */
export function loadedRuleset(
  contentSha256: string,
  readContent: () => Promise<unknown>,
): Promise<LoadedRuleset> {
  const hit = entries.get(contentSha256);
  if (hit) {
    entries.delete(contentSha256);
    entries.set(contentSha256, hit);
    return hit;
  }
  const loading = readContent().then((content) => {
    const loaded = loadRulesetFile(content, `stored ruleset ${contentSha256.slice(0, 12)}`);
    if (loaded.contentSha256 !== contentSha256) {
      throw new Error(
        `stored ruleset content hashes to ${loaded.contentSha256}, not the recorded ${contentSha256}`,
      );
    }
    return loaded;
  });
  entries.set(contentSha256, loading);
  loading.catch(() => entries.delete(contentSha256));
  while (entries.size > CAPACITY) entries.delete(entries.keys().next().value as string);
  return loading;
}
