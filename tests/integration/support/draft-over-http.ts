/**
 * A draft started and saved the way the walk-through does it, over the API: POST the draft, then
 * one merge patch over its first row version. For tests about what those answers become.
 */
import { expect } from 'vitest';
import type { TestClient } from './fixtures';

export async function saveNewDraft(
  client: TestClient,
  draft: { gateId: string; family: string; purpose?: string },
  patch: unknown,
): Promise<{ id: string; saved: Response }> {
  const created = await client.json('POST', '/api/assessments', { purpose: 'inspection', ...draft });
  expect(created.status, await created.clone().text()).toBe(201);
  const id = (await created.json()).id as string;
  const saved = await client.fetch(`/api/assessments/${id}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/merge-patch+json', 'if-match': '"1"' },
    body: JSON.stringify(patch),
  });
  return { id, saved };
}
