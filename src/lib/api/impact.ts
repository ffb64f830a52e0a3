/** Query of the ruleset impact list and its CSV export. */
import { z } from 'zod';
import { IdSchema } from './common';

export const ImpactQuerySchema = z.strictObject({
  versionId: IdSchema,
  /** `latest`: each gate's most recent signed assessment of the family; `all`: every one. */
  basis: z.enum(['latest', 'all'], 'must be latest or all').default('latest'),
});
export type ImpactQuery = z.infer<typeof ImpactQuerySchema>;
