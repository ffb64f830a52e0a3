/**
 * HRN for a failing finding: factor keys derived from the site and usage class with the rule's
 * worst credible harm (the calculators' deriveHrnFactors), optionally overridden by the auditor
 * for that rule, priced with the ruleset version's own HRN table and bands.
 */
import { calculateHrn, deriveHrnFactors, HRN_BANDS, type DerivedHrnFactors, type DphKey, type HrnTable as CalculatorHrnTable } from './calculators/hrn';
import type { AssessmentInput } from './input';
import type { HrnTable } from './ruleset-schema';
import type { FindingHrn } from './result-types';

interface PricedTable {
  table: CalculatorHrnTable;
  bands: typeof HRN_BANDS;
}

const priced = new WeakMap<HrnTable, PricedTable>();

function priceTable(hrn: HrnTable): PricedTable {
  let found = priced.get(hrn);
  if (!found) {
    const record = (levels: HrnTable['lo']) => Object.fromEntries(levels.map((level) => [level.key, level.value]));
    found = {
      table: { lo: record(hrn.lo), fe: record(hrn.fe), dph: record(hrn.dph), np: hrn.np.map((row) => ({ key: row.key, upTo: row.upTo, factor: row.value })) },
      bands: hrn.bands.map((band) => ({ band: band.key, upTo: band.upTo })) as unknown as typeof HRN_BANDS,
    };
    priced.set(hrn, found);
  }
  return found;
}

/** Rates one failing rule at this gate. */
export function rateFinding(input: AssessmentInput, harm: string, ruleId: string, hrn: HrnTable): FindingHrn {
  const override = input.hrnOverrides?.[ruleId];
  const overrideKeys: Partial<DerivedHrnFactors> = {};
  if (override?.lo) overrideKeys.lo = override.lo as DerivedHrnFactors['lo'];
  if (override?.fe) overrideKeys.fe = override.fe as DerivedHrnFactors['fe'];
  if (override?.dph) overrideKeys.dph = override.dph as DerivedHrnFactors['dph'];
  if (override?.np) overrideKeys.np = override.np as DerivedHrnFactors['np'];
  const keys = deriveHrnFactors(
    {
      usageClass: input.profile.usageClass,
      childrenOrPetsPresent: input.site.childrenOrPetsPresent,
      pedestriansUseDriveway: input.site.pedestriansUseDriveway,
      publicAccess: input.site.publicAccess,
      severity: harm as DphKey,
    },
    overrideKeys,
  );
  const { table, bands } = priceTable(hrn);
  const rated = calculateHrn(keys, table, bands);
  const result: FindingHrn = { ...rated.factors, value: rated.hrn, band: rated.band, keys: { ...rated.keys } };
  if (override) result.overrideReason = override.reason;
  return result;
}
