/**
 * The impact list builds archived assessments' engine input without re-parsing it
 * (src/lib/server/archived-input.ts). It must give exactly what buildEngineInput gives, for
 * every shipped version and many generated records, or impact lists would drift from scoring.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { contentSha256, loadRulesetFile, scoreParsed } from '@/lib/rules';
import { buildEngineInput } from '@/lib/server/assessment-input';
import { archivedEngineInput } from '@/lib/server/archived-input';
import { createPrng, sampleDocuments, sampleGate } from '../../support/archive-samples';

const root = path.resolve(__dirname, '../../../rulesets');
const versions = fs
  .readdirSync(root, { recursive: true, encoding: 'utf8' })
  .filter((f) => f.endsWith('.json'))
  .map((f) => loadRulesetFile(JSON.parse(fs.readFileSync(path.join(root, f), 'utf8'))));

describe('archived engine input', () => {
  it.each(versions.map((v) => [`${v.version.family} ${v.version.version}`, v] as const))(
    'equals buildEngineInput for generated records of %s',
    (_name, loaded) => {
      const prng = createPrng(31);
      let compared = 0;
      for (let i = 0; i < 150; i++) {
        const gate = { ...sampleGate(prng), usageClass: 1 + (i % 4) };
        if (i % 5 === 0) Object.assign(gate, { weightKg: null, entered: {} });
        const documents = sampleDocuments(
          prng,
          versions[i % versions.length]!.version,
          i % 3 === 0 ? 0.6 : 0.97,
        );
        const slow = buildEngineInput(gate as never, documents as never, loaded.version.questions);
        if (!slow.ok) continue;
        const fast = archivedEngineInput(gate as never, documents as never, loaded.version.questions);
        expect(contentSha256(fast)).toBe(contentSha256(slow.value));
        expect(scoreParsed(fast, loaded).verdict).toBe(scoreParsed(slow.value, loaded).verdict);
        compared++;
      }
      expect(compared).toBeGreaterThan(50);
    },
  );
});
