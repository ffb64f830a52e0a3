/**
 * Default HRN factor keys for a gate from what the auditor already recorded, so a hazard gets
 * a sensible rating before anyone tunes it. A rule of thumb of ours — common practice, no source.
 */
import type { UsageClass } from './gate-kind';
import type { DphKey, FeKey, LoKey, NpKey } from './hrn';

/** Facts about the site and hazard that the default factors are derived from. */
export interface HrnSiteFacts {
  usageClass: UsageClass;
  childrenOrPetsPresent: boolean;
  pedestriansUseDriveway: boolean;
  publicAccess: boolean;
  /** Worst credible harm of the hazard being rated. */
  severity: DphKey;
}

/** Factor keys of the default HRN table. */
export interface DerivedHrnFactors {
  lo: LoKey;
  fe: FeKey;
  dph: DphKey;
  np: NpKey;
}

const LO_SCALE: readonly LoKey[] = [
  'almost_impossible',
  'highly_unlikely',
  'unlikely',
  'possible',
  'even_chance',
  'probable',
  'likely',
  'certain',
];
const FE_SCALE: readonly FeKey[] = ['annually', 'monthly', 'weekly', 'daily', 'hourly', 'constantly'];

/** Gate cycles by usage class: homes daily, commercial and industrial sites hourly, guarded sites daily. */
// common practice, no source
export const HRN_DEFAULT_FE_BY_CLASS: Readonly<Record<UsageClass, FeKey>> = Object.freeze({
  1: 'daily',
  2: 'hourly',
  3: 'hourly',
  4: 'daily',
});

/** People near the gate at once: a household 1–2, other sites 3–7, public access 8–15. */
// common practice, no source
export const HRN_DEFAULT_NP_BY_CLASS: Readonly<Record<UsageClass, NpKey>> = Object.freeze({
  1: '1_2',
  2: '3_7',
  3: '3_7',
  4: '3_7',
});
/** NP band when the public can reach the gate. */
export const HRN_DEFAULT_NP_PUBLIC_ACCESS: NpKey = '8_15'; // common practice, no source

/** Likelihood starts at "unlikely" and rises one step per aggravating fact. */
export const HRN_DEFAULT_LO_BASE: LoKey = 'unlikely'; // common practice, no source

const step = <K>(scale: readonly K[], from: K, by: number): K =>
  scale[Math.min(scale.length - 1, scale.indexOf(from) + by)] as K;

/**
 * Default LO/FE/DPH/NP keys: LO rises a step each for children or pets, pedestrians in the
 * driveway and public access; FE follows the usage class, a step higher when pedestrians use
 * the driveway; DPH is the stated severity; NP follows the class, or the public-access band.
 * `overrides` win over every default.
 */
export function deriveHrnFactors(
  facts: HrnSiteFacts,
  overrides: Partial<DerivedHrnFactors> = {},
): DerivedHrnFactors {
  const aggravating = [facts.childrenOrPetsPresent, facts.pedestriansUseDriveway, facts.publicAccess].filter(
    Boolean,
  ).length;
  const derived: DerivedHrnFactors = {
    lo: step(LO_SCALE, HRN_DEFAULT_LO_BASE, aggravating),
    fe: step(FE_SCALE, HRN_DEFAULT_FE_BY_CLASS[facts.usageClass], facts.pedestriansUseDriveway ? 1 : 0),
    dph: facts.severity,
    np: facts.publicAccess ? HRN_DEFAULT_NP_PUBLIC_ACCESS : HRN_DEFAULT_NP_BY_CLASS[facts.usageClass],
  };
  return { ...derived, ...overrides };
}
