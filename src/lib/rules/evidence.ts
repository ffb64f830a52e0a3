/**
 * Evidence a calculator refused (a force trace sampled too slowly, an impossible operator
 * layout): reported with the input path to fix instead of failing the whole assessment.
 */
import { ForceTraceError } from './calculators/force-trace-error';

/** Evidence a calculator refused, with the input path to fix. */
export interface EvidenceProblem {
  path: string;
  code: string;
  message: string;
}

/** Turns a calculator's refusal into an evidence problem; anything else is a bug and is rethrown. */
export function refusal(path: string, error: unknown): EvidenceProblem {
  if (error instanceof ForceTraceError) return { path, code: error.code, message: error.message };
  if (error instanceof RangeError) return { path, code: 'out_of_range', message: error.message };
  throw error;
}
