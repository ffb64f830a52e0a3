/**
 * The amendment editor's calls to /api: each answers `{ ok: true, value }` or the server's
 * problem (status, detail and per-field errors), or a problem saying there is no connection.
 */
import type { AmendmentPatch, AmendmentProblem, RulesetVersionDetail } from '@/lib/api/rulesets';
import type { RulesetDiff } from '@/lib/rules/diff';

export interface Problem {
  status: number;
  detail: string;
  errors: AmendmentProblem[];
}

export type Answer<T> = { ok: true; value: T } | { ok: false; problem: Problem };

async function call<T>(method: string, url: string, body?: unknown): Promise<Answer<T>> {
  let response: Response;
  try {
    response = await fetch(url, {
      method,
      credentials: 'same-origin',
      headers: { accept: 'application/json', ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    return { ok: false, problem: { status: 0, detail: 'No connection to the server. Try again when you have signal.', errors: [] } };
  }
  const json = response.status === 204 ? null : await response.json().catch(() => null);
  if (response.ok) return { ok: true, value: json as T };
  return { ok: false, problem: { status: response.status, detail: json?.detail ?? `The server answered ${response.status}.`, errors: json?.errors ?? [] } };
}

const versionUrl = (family: string, version: string) => `/api/rulesets/${encodeURIComponent(family)}/${encodeURIComponent(version)}`;

export const amendDraft = (family: string, version: string, patch: AmendmentPatch) => call<RulesetVersionDetail>('PATCH', versionUrl(family, version), patch);

export const publishDraft = (family: string, version: string) => call<RulesetVersionDetail>('POST', `${versionUrl(family, version)}/publish`);

export const deleteDraft = (family: string, version: string) => call<null>('DELETE', versionUrl(family, version));

export function fetchDiff(family: string, query: { from: string; to: string; fromFamily?: string }): Promise<Answer<RulesetDiff>> {
  const params = new URLSearchParams({ from: query.from, to: query.to, ...(query.fromFamily ? { fromFamily: query.fromFamily } : {}) });
  return call<RulesetDiff>('GET', `/api/rulesets/${encodeURIComponent(family)}/diff?${params}`);
}
