/**
 * The ruleset impact list: pick a published version, and the archive is re-scored against it
 * on the server, as a run on the job queue (queued when the version was published, or here when
 * none was); the page shows its progress while the server instances score its slices. Gates
 * whose verdict would get worse are listed with the rules responsible, most severe first, and
 * the whole list can be downloaded as CSV.
 */
import { QueryClient, QueryClientProvider, useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import type { ImpactRunView } from '@/lib/api/impact';
import { count, formatDay, listOf, SEVERITY_LABEL, verdictLabel } from '@/lib/vocabulary';
import { impactRun, startImpactRun, valueOf } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';

export interface ImpactCandidate {
  id: string;
  family: string;
  title: string;
  version: string;
  publishedAt: string | null;
}

interface Props {
  candidates: ImpactCandidate[];
  initialVersionId: string | null;
  initialBasis: 'latest' | 'all';
  timeZone: string;
}

export default function ImpactApp(props: Props) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: { queries: { staleTime: 5 * 60_000, refetchOnWindowFocus: false, retry: 0 } },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <ImpactList {...props} />
    </QueryClientProvider>
  );
}

/** Verdicts as coloured text (a status), not filled pills that look like buttons. */
const verdictClass: Record<string, string> = {
  clear: 'text-clear',
  remedy: 'text-remedy',
  withdraw: 'text-withdraw',
};
const beforeWords: Record<string, string> = {
  pass: 'passed',
  fail: 'failed at a lower severity',
  'n/a': 'did not apply',
  needs_info: 'could not be checked',
  absent: 'new rule',
};

function ImpactList({ candidates, initialVersionId, initialBasis, timeZone }: Props) {
  const [versionId, setVersionId] = useState(initialVersionId ?? '');
  const [basis, setBasis] = useState(initialBasis);
  const query = new URLSearchParams({ versionId, basis }).toString();
  useEffect(() => {
    if (versionId) window.history.replaceState(null, '', `?${query}`);
  }, [query, versionId]);
  const view = useQuery({
    queryKey: ['impact-run', query],
    queryFn: ({ signal }) => valueOf(impactRun(query, signal)),
    enabled: Boolean(versionId),
    staleTime: 0,
    // While the run is queued or running, ask again every second for its progress.
    refetchInterval: (q) => {
      const status = q.state.data?.run?.status;
      return status === 'queued' || status === 'running' ? 1000 : false;
    },
  });
  const [startError, setStartError] = useState<string | null>(null);
  const [starting, setStarting] = useState(false);
  const start = async () => {
    setStarting(true);
    setStartError(null);
    const answer = await startImpactRun({ versionId, basis });
    if (!answer.ok) setStartError(problemMessage(answer.problem));
    setStarting(false);
    await view.refetch();
  };
  // No run of this version and basis yet: queue one.
  const noRun = view.data !== undefined && view.data.run === null;
  useEffect(() => {
    if (noRun && !starting && !startError) void start();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [noRun, query]);
  const run = view.data?.run ?? null;
  const busy = run !== null && (run.status === 'queued' || run.status === 'running');
  const report = { ...view, isFetching: busy || starting || (view.isFetching && !view.data) };
  const day = { format: (date: Date) => formatDay(date, timeZone) };
  const data = view.data?.report ?? null;

  return (
    <div className="mt-4 grid gap-4">
      <form className="card grid gap-3 sm:grid-cols-[1fr_auto]" onSubmit={(e) => e.preventDefault()}>
        <label>
          <span className="label">Newly published version</span>
          <select className="field" value={versionId} onChange={(e) => setVersionId(e.target.value)}>
            <option value="">Choose a version…</option>
            {candidates.map((c) => (
              <option key={c.id} value={c.id}>
                {c.title} {c.version}
                {c.publishedAt ? ` (published ${day.format(new Date(c.publishedAt))})` : ''}
              </option>
            ))}
          </select>
        </label>
        <fieldset>
          <legend className="label">Re-score</legend>
          <label className="mr-4 inline-flex min-h-11 items-center gap-2">
            <input
              type="radio"
              name="basis"
              checked={basis === 'latest'}
              onChange={() => setBasis('latest')}
            />{' '}
            each gate's last visit
          </label>
          <label className="inline-flex min-h-11 items-center gap-2">
            <input type="radio" name="basis" checked={basis === 'all'} onChange={() => setBasis('all')} />{' '}
            every signed visit
          </label>
        </fieldset>
      </form>

      {report.isFetching && (
        <div className="card" role="status">
          <p>
            {run?.status === 'running'
              ? `Re-scoring the archive against the new version: ${run.slicesDone} of ${run.slicesTotal} slices done${run.instances > 1 ? ` by ${run.instances} server instances` : ''}…`
              : 'Re-scoring queued: it starts when a server instance is free…'}{' '}
            (stored results are not changed)
          </p>
          {run && run.slicesTotal > 0 && (
            <progress
              className="mt-2 w-full"
              max={run.slicesTotal}
              value={run.slicesDone}
              aria-label="Slices re-scored"
            />
          )}
        </div>
      )}
      {run?.status === 'failed' && (
        <div className="card border-withdraw" role="alert">
          <p className="text-withdraw">
            The re-scoring stopped: {run.lastError ?? 'a slice failed'}. The owner can retry the failed slice
            on the Jobs page, or run the whole list again.
          </p>
          <button type="button" className="btn mt-2" disabled={starting} onClick={() => void start()}>
            Run again
          </button>
        </div>
      )}
      {startError && (
        <p className="card border-withdraw text-withdraw" role="alert">
          {startError}
        </p>
      )}
      {report.isError && (
        <p className="card border-withdraw text-withdraw" role="alert">
          {(report.error as Error).message}
        </p>
      )}
      {data && run?.status === 'done' && !report.isFetching && (
        <>
          <section className="card" aria-live="polite">
            <h2 className="text-lg font-bold">
              {candidates.find((c) => c.id === data.target.id)?.title ?? 'Ruleset'} {data.target.version}{' '}
              against {listOf(data.target.comparedWith) || 'no earlier version'}
            </h2>
            <p className="mt-1">
              {count(data.considered, 'signed assessment')} re-scored in {(data.durationMs / 1000).toFixed(1)}{' '}
              s: <strong className="text-withdraw">{data.worse} worse</strong>, {data.same} unchanged,{' '}
              {data.better} better
              {data.unscorable > 0 &&
                `, ${data.unscorable} could not be re-scored (the new version needs answers they do not have)`}
              .
            </p>
            <p className="mt-1 text-sm text-iron-600">
              Run {run.reason === 'published' ? 'queued when the version was published' : 'asked for here'},
              finished {day.format(new Date(run.finishedAt ?? run.createdAt))}.
            </p>
            <div className="mt-3 flex flex-wrap gap-2">
              <a className="btn" href={`/api/archive/impact.csv?${query}`} download>
                Download the list (CSV)
              </a>
              <button type="button" className="btn" disabled={starting} onClick={() => void start()}>
                Run again
              </button>
            </div>
          </section>
          {data.items.length > 0 && (
            <ul className="grid gap-2">
              {data.items.map((item) => (
                <li key={item.assessmentId} className="card">
                  <div className="flex flex-wrap items-center gap-2">
                    <a href={`/archive/gates/${item.gateId}`} className="font-semibold">
                      {item.gateLabel}
                    </a>
                    <span className="text-sm text-iron-600">
                      {item.address}, {item.city} · {item.clientName} · visited{' '}
                      {day.format(new Date(item.visitDate))} (version {item.fromVersion})
                    </span>
                  </div>
                  <p className="mt-1 flex flex-wrap items-center gap-1 text-sm">
                    <span className={`text-sm font-semibold ${verdictClass[item.before]}`}>
                      {verdictLabel(item.before)}
                    </span>
                    <span aria-hidden="true">→</span>
                    <span className="sr-only">would become</span>
                    {item.after && (
                      <span className={`text-sm font-semibold ${verdictClass[item.after]}`}>
                        {verdictLabel(item.after)}
                      </span>
                    )}
                  </p>
                  <ul className="mt-2 list-disc pl-5 text-sm">
                    {item.rules.map((r) => (
                      <li key={r.ruleId}>
                        <strong>{r.title}</strong>{' '}
                        <span className="text-iron-600">
                          ({SEVERITY_LABEL[r.severity as keyof typeof SEVERITY_LABEL] ?? 'Other'})
                        </span>
                        : {r.outcome === 'fail' ? 'fails' : 'cannot be checked'}; before it{' '}
                        {beforeWords[r.before] ?? r.before}.
                      </li>
                    ))}
                  </ul>
                </li>
              ))}
            </ul>
          )}
          {data.truncated && (
            <p className="text-sm text-iron-600">
              Showing the {data.items.length} most severe; the CSV has all {data.worse}.
            </p>
          )}
        </>
      )}
    </div>
  );
}
