import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { euSwingGate } from './fixtures/european-powered-gate';
import { naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, NO } from './support/inputs';
import { shipped, shippedRulesets } from './support/shipped';

const hingeOutcome = (family: string, version: string, gapMm: number) => {
  const base = family === 'north-american-gate' ? naSwingGate() : euSwingGate();
  const input = applyPatch(base, {
    answers: { hingeSideGuarded: NO },
    measurements: { hingeGapMm: len(gapMm) },
  });
  return score(input, shipped(family, version)).findings.find((f) => f.ruleId === 'pinch.hinge-side')
    ?.outcome;
};

describe.each(['north-american-gate', 'european-powered-gate'])(
  'hinge-side finger gaps in %s 2026.2',
  (family) => {
    it('passes gaps too small for fingers: under 8 mm (exclusive)', () => {
      // DHF TS 011 (secondary source): finger gaps under 8 mm — 7.9 mm passes, exactly 8 mm does not
      expect(hingeOutcome(family, '2026.2', 5)).toBe('pass');
      expect(hingeOutcome(family, '2026.2', 7.9)).toBe('pass');
      expect(hingeOutcome(family, '2026.2', 8)).toBe('fail');
    });

    it('passes the EN ISO 13854 finger gap of 25 mm itself (inclusive)', () => {
      // EN ISO 13854 Table 1 (AUVA, secondary source): minimum gap for the finger 25 mm — 25 mm is enough
      expect(hingeOutcome(family, '2026.2', 25)).toBe('pass');
      expect(hingeOutcome(family, '2026.2', 24.9)).toBe('fail');
    });

    it('differs from 2026.1, which failed 5 mm and 25 mm', () => {
      expect(hingeOutcome(family, '2026.1', 5)).toBe('fail');
      expect(hingeOutcome(family, '2026.1', 25)).toBe('fail');
    });
  },
);

/** The newest shipped version of each family. */
function newestVersions() {
  const newest = new Map<string, ReturnType<typeof shippedRulesets>[number]>();
  for (const r of shippedRulesets()) {
    const seen = newest.get(r.version.family);
    if (!seen || seen.version.version < r.version.version) newest.set(r.version.family, r);
  }
  return [...newest.values()];
}

describe.each(newestVersions().map((r) => [`${r.version.family} ${r.version.version}`, r] as const))(
  'finger bounds of %s',
  (_label, ruleset) => {
    it('are one pair for every rule: fingers cannot enter under one figure, are clear from another', () => {
      // DHF TS 011 8 mm and EN ISO 13854 25 mm (secondary sources): every rule of the family uses the same two
      const fingerParams = ruleset.version.rules.flatMap((rule) =>
        Object.entries(rule.params)
          .filter(([name]) => name.toLowerCase().includes('finger'))
          .map(([name, param]) => ({ rule: rule.id, name, value: param.value })),
      );
      expect(fingerParams.length).toBeGreaterThan(0);
      for (const name of new Set(fingerParams.map((p) => p.name))) {
        expect(['fingerSafeBelowMm', 'fingerClearFromMm'], `${name} is not one of the pair`).toContain(name);
        const values = new Set(fingerParams.filter((p) => p.name === name).map((p) => p.value));
        expect([...values], `${name} differs between rules`).toHaveLength(1);
      }
      const safe = fingerParams.find((p) => p.name === 'fingerSafeBelowMm')?.value;
      expect(safe).toBe(8);
      const clear = fingerParams.find((p) => p.name === 'fingerClearFromMm')?.value;
      if (clear !== undefined) expect(clear).toBe(25);
    });
  },
);
