/**
 * HRN for a failing finding: factor keys derived from the site and usage class with the rule's
 * worst credible harm (the calculators' deriveHrnFactors), optionally overridden by the auditor
 * for that rule, priced with the ruleset version's own HRN table and bands.
 */
import {
  calculateHrn,
  deriveHrnFactors,
  HRN_BANDS,
  type DerivedHrnFactors,
  type DphKey,
  type HrnTable as CalculatorHrnTable,
  type LoKey,
} from './calculators/hrn';
import type { Severity } from './vocabulary';
import type { AssessmentInput } from './input';
import type { HrnTable } from './ruleset-schema';
import type { FindingHrn } from './result-types';

interface PricedTable {
  table: CalculatorHrnTable;
  bands: typeof HRN_BANDS;
  /** Ratings already worked out, by factor keys: a version has few distinct combinations. */
  rated: Map<string, ReturnType<typeof calculateHrn>>;
}

const priced = new WeakMap<HrnTable, PricedTable>();

function priceTable(hrn: HrnTable): PricedTable {
  let found = priced.get(hrn);
  if (!found) {
    const record = (levels: HrnTable['lo']) =>
      Object.fromEntries(levels.map((level) => [level.key, level.value]));
    found = {
      table: {
        lo: record(hrn.lo),
        fe: record(hrn.fe),
        dph: record(hrn.dph),
        np: hrn.np.map((row) => ({ key: row.key, upTo: row.upTo, factor: row.value })),
      },
      bands: hrn.bands.map((band) => ({ band: band.key, upTo: band.upTo })) as unknown as typeof HRN_BANDS,
      rated: new Map(),
    };
    priced.set(hrn, found);
  }
  return found;
}

/** How many distinct sites siteCode tells apart (four usage classes × three yes/no facts). */
export const SITE_CODES = 32;

/**
 * Ratings without an override depend only on the HRN table, the worst harm and four site facts
 * (usage class, children or pets, pedestrians, public access): 32 sites. A rule keeps its own
 * ratings by site (`shared`, from the compiled rule), so every finding that rates the same shares
 * one frozen rating.
 */
function siteCode(input: AssessmentInput): number {
  const { site } = input;
  return (
    (input.profile.usageClass - 1) * 8 +
    (site.childrenOrPetsPresent ? 4 : 0) +
    (site.pedestriansUseDriveway ? 2 : 0) +
    (site.publicAccess ? 1 : 0)
  );
}

/** Rates one failing rule at this gate. */
export function rateFinding(
  input: AssessmentInput,
  harm: string,
  ruleId: string,
  hrn: HrnTable,
  shared: Array<FindingHrn | undefined> = [],
  severity: Severity = 'major',
): FindingHrn {
  const override = input.hrnOverrides?.[ruleId];
  if (override) return rate(input, harm, hrn, override, severity);
  const code = siteCode(input);
  let rating = shared[code];
  if (!rating) shared[code] = rating = Object.freeze(rate(input, harm, hrn, null, severity));
  return rating;
}

/**
 * The likelihood the table's own scale gives after stepping `by` places from `from` (held at
 * either end). The version's LO levels are listed least to most likely.
 */
function stepLikelihood(hrn: HrnTable, from: LoKey, by: number): LoKey {
  if (by === 0) return from;
  const at = hrn.lo.findIndex((level) => level.key === from);
  if (at < 0) return from;
  return hrn.lo[Math.max(0, Math.min(hrn.lo.length - 1, at + by))]!.key as LoKey;
}

function rate(
  input: AssessmentInput,
  harm: string,
  hrn: HrnTable,
  override: NonNullable<AssessmentInput['hrnOverrides']>[string] | null,
  severity: Severity,
): FindingHrn {
  const base = deriveHrnFactors({
    usageClass: input.profile.usageClass,
    childrenOrPetsPresent: input.site.childrenOrPetsPresent,
    pedestriansUseDriveway: input.site.pedestriansUseDriveway,
    publicAccess: input.site.publicAccess,
    severity: harm as DphKey,
  });
  // A version may step the likelihood by the rule's severity, so default ratings follow it.
  const derived = {
    ...base,
    lo: stepLikelihood(hrn, base.lo, hrn.likelihoodStepBySeverity?.[severity] ?? 0),
  };
  const keys: DerivedHrnFactors = override
    ? {
        lo: (override.lo as DerivedHrnFactors['lo'] | undefined) ?? derived.lo,
        fe: (override.fe as DerivedHrnFactors['fe'] | undefined) ?? derived.fe,
        dph: (override.dph as DerivedHrnFactors['dph'] | undefined) ?? derived.dph,
        np: (override.np as DerivedHrnFactors['np'] | undefined) ?? derived.np,
      }
    : derived;
  const priced = priceTable(hrn);
  const cacheKey = `${keys.lo}|${keys.fe}|${keys.dph}|${keys.np}`;
  let rated = priced.rated.get(cacheKey);
  if (!rated) {
    rated = calculateHrn(keys, priced.table, priced.bands, hrn.bandEdges ?? 'upper_inclusive');
    priced.rated.set(cacheKey, rated);
  }
  const result: FindingHrn = {
    lo: rated.factors.lo,
    fe: rated.factors.fe,
    dph: rated.factors.dph,
    np: rated.factors.np,
    value: rated.hrn,
    band: rated.band,
    keys: Object.freeze({ lo: rated.keys.lo, fe: rated.keys.fe, dph: rated.keys.dph, np: rated.keys.np }),
  };
  if (override) result.overrideReason = override.reason;
  return result;
}
