/**
 * The auditor's walk-through of one gate: the pinned ruleset version's questions grouped by
 * walk section in the order one walks a gate, each with its answer, note and photos; the
 * gate-and-site facts, entrapment protection, force traces and swing geometry where they
 * belong; autosave through the device's edit queue; the live result and Submit.
 */
import type { WalkDraft, WalkGate, WalkRuleset } from '@/lib/api/walk-through';
import { QueryClient, QueryClientProvider, useMutation } from '@tanstack/react-query';
import { lazy, Suspense, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { AssessmentStatus } from '@/lib/api/assessments';
import type { ScoreResult } from '@/lib/rules/result-types';
import type { UnitSystem } from '@/lib/units';
import { submitAssessment } from '@/lib/api/client';
import { offlineProblem, type Problem } from '@/lib/api/problem';
import {
  groupBySection,
  isAnswered,
  mergeNeeds,
  questionKeyOfFact,
  questionsToShow,
  toolOfFact,
} from '@/lib/walk/model';
import type { PhotoRecord, TraceRecord } from '@/lib/api/uploads';
import { ConflictDialog } from './ConflictDialog';
import { WalkActionsContext, type WalkActions } from './context';
import { EntrapmentCard } from './EntrapmentCard';
import { GateAndSiteCard } from './GateAndSiteCard';
import { LiveSummary } from './LiveSummary';
import type { PendingPhoto } from './PhotoStrip';
import { QuestionCard } from './QuestionCard';
import { RefusedNotices } from './RefusedNotices';
import { ResultView } from './ResultView';
import { StatusBar, type WalkView } from './StatusBar';
import { ToCheckList } from './ToCheckList';
import { usePendingPhotoUrls } from './usePendingPhotoUrls';
import { usePreview } from './usePreview';
import { useWalkSync } from './useWalkSync';

// Loaded after the page is interactive: most of a walk never needs a chart.
const ForceTracePanel = lazy(() => import('./ForceTracePanel'));
const SwingGeometryPanel = lazy(() => import('./SwingGeometryPanel'));

export interface WalkThroughProps {
  assessment: { id: string; status: AssessmentStatus; rowVersion: number; result: ScoreResult | null };
  draft: WalkDraft;
  gate: WalkGate;
  ruleset: WalkRuleset;
  photos: PhotoRecord[];
  traces: TraceRecord[];
  units: UnitSystem;
  editable: boolean;
  gateEditUrl: string;
}

export default function WalkThrough(props: WalkThroughProps) {
  const [client] = useState(
    () => new QueryClient({ defaultOptions: { queries: { refetchOnWindowFocus: false } } }),
  );
  return (
    <QueryClientProvider client={client}>
      <WalkApp {...props} />
    </QueryClientProvider>
  );
}

const EMPTY: readonly never[] = [];

function ToolSlot({ children, mounted }: { children: React.ReactNode; mounted: boolean }) {
  const fallback = <div className="card animate-pulse text-iron-600">Loading…</div>;
  return mounted ? <Suspense fallback={fallback}>{children}</Suspense> : fallback;
}

function WalkApp({
  assessment,
  draft,
  gate,
  ruleset,
  photos,
  traces,
  units,
  editable: editableProp,
  gateEditUrl,
}: WalkThroughProps) {
  const { sync, state } = useWalkSync({
    id: assessment.id,
    rowVersion: assessment.rowVersion,
    status: assessment.status,
    draft,
    photos,
    traces,
  });
  const editable = editableProp && state.status === 'draft' && state.phase !== 'closed';
  const [view, setView] = useState<WalkView>(assessment.status === 'draft' ? 'walk' : 'result');
  const [mounted, setMounted] = useState(false);
  const [submitted, setSubmitted] = useState<ScoreResult | null>(
    assessment.status === 'draft' ? null : assessment.result,
  );
  useEffect(() => setMounted(true), []);

  const questions = useMemo(() => questionsToShow(ruleset, gate, state.view), [ruleset, gate, state.view]);
  const tools = useMemo(
    () => new Set<string>(['sensing', 'force_test', ...(gate.kind === 'swing' ? ['operator_arm'] : [])]),
    [gate.kind],
  );
  const groups = useMemo(() => groupBySection(ruleset, questions, tools), [ruleset, questions, tools]);
  const areaTitle = useMemo(
    () => new Map(ruleset.areas.map((a) => [a.key as string, a.title])),
    [ruleset.areas],
  );
  const preview = usePreview(gate, state.view, ruleset, state.online && state.status === 'draft');
  const result = submitted ?? preview.result;

  const neededBy = useMemo(() => {
    const byKey = new Map<string, number>();
    const byTool = new Set<string>();
    for (const item of preview.result?.needsInfo ?? []) {
      const key = questionKeyOfFact(item.key);
      if (key) byKey.set(key, item.ruleIds.length);
      else byTool.add(toolOfFact(item.key) ?? '');
    }
    return { byKey, byTool };
  }, [preview.result]);

  const unanswered = useMemo(
    () => questions.filter((q) => !isAnswered(q, state.view)),
    [questions, state.view],
  );
  const toCheck = useMemo(() => {
    const raw = preview.result?.needsInfo ?? [];
    const needed = new Set(raw.map((n) => n.key));
    const extra = unanswered.filter(
      (q) => !needed.has(`answers.${q.key}`) && !needed.has(`m.${q.key}`),
    ).length;
    return preview.blockers.length + mergeNeeds(raw).length + extra;
  }, [preview.result, preview.blockers, unanswered]);

  const pendingUrls = usePendingPhotoUrls(state.pending);
  const photosByItem = useMemo(() => {
    const map = new Map<string, PhotoRecord[]>();
    for (const photo of state.photos) map.set(photo.itemKey, [...(map.get(photo.itemKey) ?? []), photo]);
    return map;
  }, [state.photos]);
  const pendingByItem = useMemo(() => {
    const map = new Map<string, PendingPhoto[]>();
    for (const op of state.pending) {
      if (op.kind !== 'photo') continue;
      map.set(op.itemKey, [
        ...(map.get(op.itemKey) ?? []),
        { clientRef: op.clientRef, fileName: op.fileName, url: pendingUrls[op.clientRef] },
      ]);
    }
    return map;
  }, [state.pending, pendingUrls]);

  const [submitProblem, setSubmitProblem] = useState<Problem | null>(null);
  const submit = useMutation({
    mutationFn: () => submitAssessment(assessment.id, state.rowVersion),
    networkMode: 'always',
    onSuccess: async (answer) => {
      if (!answer.ok) {
        setSubmitProblem(answer.problem);
        return;
      }
      setSubmitProblem(null);
      await sync.acceptSubmitted(answer.value);
      setSubmitted((answer.value.result as ScoreResult | null) ?? null);
      window.scrollTo({ top: 0 });
    },
    onError: () => setSubmitProblem(offlineProblem()),
  });
  const submitBlocked =
    state.phase === 'conflict'
      ? 'Resolve the conflicting changes first.'
      : !state.online
        ? 'Submitting needs a connection; your answers are safe on this phone.'
        : state.pendingCount > 0 || state.phase === 'saving' || state.phase === 'waiting'
          ? 'Wait until every change is saved.'
          : null;

  // Each view keeps its own scroll position: back on Walk is where the auditor left off.
  const scrollOf = useRef<Record<WalkView, number>>({ walk: 0, check: 0, result: 0 });
  const switchView = useCallback(
    (next: WalkView) => {
      if (next === view) return;
      scrollOf.current[view] = window.scrollY;
      setView(next);
      requestAnimationFrame(() => window.scrollTo({ top: scrollOf.current[next] }));
    },
    [view],
  );

  const go = useCallback((targetId: string) => {
    setView('walk');
    requestAnimationFrame(() => {
      const element = document.getElementById(targetId);
      if (!element) return;
      element.scrollIntoView({ block: 'start' });
      element.focus({ preventScroll: true });
    });
  }, []);

  const actions: WalkActions = useMemo(
    () => ({ sync, assessmentId: assessment.id, units, editable }),
    [sync, assessment.id, units, editable],
  );
  const observations = state.view.observations;

  return (
    <WalkActionsContext.Provider value={actions}>
      <StatusBar
        state={state}
        verdict={result?.verdict ?? null}
        stale={!submitted && preview.stale}
        toCheck={submitted ? 0 : toCheck}
        view={view}
        onView={switchView}
      />
      <div
        className={`mt-4 ${view !== 'result' ? 'lg:grid lg:grid-cols-[minmax(0,1fr)_18rem] lg:items-start lg:gap-6' : ''}`}
      >
        <div className="grid min-w-0 gap-4">
          <RefusedNotices refused={state.refused} onDismiss={(id) => sync.dismissRefused(id)} />
          {state.phase === 'closed' && !submitted && (
            <p role="status" className="card border-l-4 border-l-iron-600 font-semibold">
              This assessment was submitted and can no longer be changed.
            </p>
          )}

          <div
            id="panel-walk"
            role="tabpanel"
            aria-labelledby="tab-walk"
            hidden={view !== 'walk'}
            className="grid gap-4"
          >
            <nav aria-label="Sections" className="-mx-4 overflow-x-auto px-4 sm:mx-0 sm:px-0">
              <ol className="flex gap-2 pb-1">
                {groups.map((group, i) => {
                  const answered = group.questions.filter((q) => isAnswered(q, state.view)).length;
                  return (
                    <li key={group.key} className="shrink-0">
                      <a
                        href={`#section-${group.key}`}
                        className="flex min-h-11 items-center gap-2 rounded-full border border-iron-200 bg-white px-3 text-sm font-semibold text-iron-900 no-underline hover:border-iron-400"
                      >
                        <span>
                          {i + 1}. {group.title}
                        </span>
                        {group.questions.length > 0 && (
                          <span
                            className={`tabular-nums ${answered === group.questions.length ? 'text-clear' : 'text-iron-600'}`}
                          >
                            {answered}/{group.questions.length}
                          </span>
                        )}
                      </a>
                    </li>
                  );
                })}
              </ol>
            </nav>

            <GateAndSiteCard
              site={observations.site as never}
              gate={gate}
              gateEditUrl={gateEditUrl}
              units={units}
              neededSite={
                neededBy.byTool.has('site') || preview.blockers.some((b) => !/edit the gate/.test(b))
              }
              neededGate={
                neededBy.byTool.has('gate') || preview.blockers.some((b) => /edit the gate/.test(b))
              }
            />

            {groups.map((group, i) => (
              <section
                key={group.key}
                id={`section-${group.key}`}
                aria-labelledby={`section-${group.key}-title`}
                className="grid scroll-mt-28 gap-3"
              >
                <h2 id={`section-${group.key}-title`} className="mt-2 text-xl font-bold text-iron-900">
                  <span className="text-brass-700">{i + 1}.</span> {group.title}
                </h2>
                {group.questions.map((q) => (
                  <QuestionCard
                    key={q.key}
                    question={q}
                    areaTitle={areaTitle.get(q.area) ?? q.area}
                    answer={state.view.answers[q.key]}
                    measurement={state.view.measurements[q.key]}
                    photos={photosByItem.get(q.key) ?? EMPTY}
                    pendingPhotos={pendingByItem.get(q.key) ?? EMPTY}
                    neededBy={neededBy.byKey.get(q.key) ?? 0}
                  />
                ))}
                {group.key === 'sensing' && (
                  <EntrapmentCard
                    value={observations.entrapment}
                    needed={neededBy.byTool.has('entrapment')}
                  />
                )}
                {group.key === 'operator_arm' && gate.kind === 'swing' && (
                  <ToolSlot mounted={mounted}>
                    <SwingGeometryPanel
                      gate={gate}
                      value={observations.swingGeometry}
                      needed={neededBy.byTool.has('geometry')}
                    />
                  </ToolSlot>
                )}
                {group.key === 'force_test' && (
                  <ToolSlot mounted={mounted}>
                    <ForceTracePanel
                      gateKind={gate.kind}
                      traces={state.traces}
                      pending={state.pending}
                      needed={neededBy.byTool.has('force')}
                    />
                  </ToolSlot>
                )}
              </section>
            ))}
            {!submitted && (
              <button type="button" className="btn w-full" onClick={() => switchView('result')}>
                Review the result and submit
              </button>
            )}
          </div>

          <div id="panel-check" role="tabpanel" aria-labelledby="tab-check" hidden={view !== 'check'}>
            <ToCheckList
              blockers={preview.blockers}
              needsInfo={preview.result?.needsInfo ?? EMPTY}
              unanswered={unanswered}
              previewAvailable={Boolean(preview.result)}
              onGo={go}
            />
          </div>

          <div id="panel-result" role="tabpanel" aria-labelledby="tab-result" hidden={view !== 'result'}>
            <ResultView
              ruleset={ruleset}
              result={result}
              submitted={Boolean(submitted)}
              blockers={preview.blockers}
              refused={preview.refused}
              stale={preview.stale}
              online={state.online}
              submitBlocked={submitBlocked}
              submitting={submit.isPending}
              submitProblem={submitProblem}
              onSubmit={() => submit.mutate()}
              onGoToCheck={() => switchView('check')}
              reportUrl={`/assessments/${assessment.id}/report`}
            />
          </div>
        </div>
        {view !== 'result' && (
          <aside aria-label="Live result" className="sticky top-36 hidden lg:block">
            <LiveSummary
              result={result}
              ruleset={ruleset}
              stale={!submitted && preview.stale}
              toCheck={submitted ? 0 : toCheck}
              blockers={preview.blockers.length}
              onOpen={switchView}
            />
          </aside>
        )}
      </div>
      {state.phase === 'conflict' && (
        <ConflictDialog
          conflicts={state.conflicts}
          questions={ruleset.questions}
          onResolve={(choices) => void sync.resolveConflicts(choices)}
        />
      )}
    </WalkActionsContext.Provider>
  );
}
