/**
 * The live result: the device's current answers scored by `POST /api/score` against the
 * pinned ruleset version, a moment after the last change, while online. The previous result
 * stays on screen while the next one is worked out (and while offline, marked as such).
 */
import type { WalkDraft, WalkGate, WalkRuleset } from '@/lib/api/walk-through';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import type { ScoreResult } from '@/lib/rules/result-types';
import { scorePreview } from '@/lib/api/client';
import type { Problem } from '@/lib/api/problem';
import { buildPreviewInput } from '@/lib/walk/score-input';

const SETTLE_MS = 700;

export class PreviewRefused extends Error {
  constructor(readonly problem: Problem) {
    super(problem.detail ?? 'The preview could not be scored');
  }
}

export interface Preview {
  result: ScoreResult | undefined;
  /** Something must be answered before anything can be scored. */
  blockers: string[];
  refused: Problem | null;
  updating: boolean;
  /** The result shown is from before the latest changes. */
  stale: boolean;
}

export function usePreview(gate: WalkGate, draft: WalkDraft, ruleset: WalkRuleset, online: boolean): Preview {
  const { input, blockers } = useMemo(() => buildPreviewInput(gate, draft), [gate, draft]);
  // Key order follows whoever wrote the document last; the same answers must be the same request.
  const body = useMemo(
    () => stableJson({ family: ruleset.family, version: ruleset.version, input }),
    [input, ruleset.family, ruleset.version],
  );
  const [settled, setSettled] = useState({ body, ready: blockers.length === 0 });
  useEffect(() => {
    const timer = setTimeout(() => setSettled({ body, ready: blockers.length === 0 }), SETTLE_MS);
    return () => clearTimeout(timer);
  }, [body, blockers.length]);

  const query = useQuery({
    queryKey: ['walk-preview', settled.body],
    queryFn: async () => {
      const answer = await scorePreview(JSON.parse(settled.body));
      if (!answer.ok) throw new PreviewRefused(answer.problem);
      return answer.value as ScoreResult;
    },
    enabled: online && settled.ready && blockers.length === 0,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    gcTime: 60_000,
    retry: (count, error) => !(error instanceof PreviewRefused) && count < 2,
    networkMode: 'always',
  });

  return {
    result: query.data,
    blockers,
    refused: query.error instanceof PreviewRefused ? query.error.problem : null,
    updating: query.isFetching,
    stale: settled.body !== body || query.isPlaceholderData || !online,
  };
}

/** JSON with object keys sorted, so equal content is an equal string. */
function stableJson(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(
          Object.entries(v as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)),
        )
      : v,
  );
}
