/**
 * Per-family fixtures: base gates and each rule's passing and failing patch.
 */
import type { AssessmentInput } from '@/lib/rules';
import { EUROPEAN_FIXTURES, euSlideGate, euSwingGate } from '../fixtures/european-powered-gate';
import {
  NORTH_AMERICAN_FIXTURES,
  naSlideGate,
  naSwingGate,
  type RuleFixture,
} from '../fixtures/north-american-gate';

export interface FamilyFixtures {
  base: Record<'swing' | 'slide', () => AssessmentInput>;
  rules: Readonly<Record<string, RuleFixture>>;
}

export const FAMILY_FIXTURES: Readonly<Record<string, FamilyFixtures>> = {
  'north-american-gate': { base: { swing: naSwingGate, slide: naSlideGate }, rules: NORTH_AMERICAN_FIXTURES },
  'european-powered-gate': { base: { swing: euSwingGate, slide: euSlideGate }, rules: EUROPEAN_FIXTURES },
};
