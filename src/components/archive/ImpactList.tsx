/**
 * The ruleset impact list: pick a published version, and the archive is re-scored against it
 * on the server; gates whose verdict would get worse are listed with the rules responsible,
 * most severe first, and the whole list can be downloaded as CSV.
 */
import { QueryClient, QueryClientProvider, useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { formatDay, verdictLabel } from '@/lib/vocabulary';
import { count, listOf, SEVERITY_LABEL } from '@/lib/vocabulary';
import { impactReport, valueOf } from '@/lib/api/client';

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
  const report = useQuery({
    queryKey: ['impact', query],
    queryFn: ({ signal }) => valueOf(impactReport(query, signal)),
    enabled: Boolean(versionId),
  });
  const day = { format: (date: Date) => formatDay(date, timeZone) };
  const data = report.data;

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
        <p className="card" role="status">
          Re-scoring the archive against the new version… (stored results are not changed)
        </p>
      )}
      {report.isError && (
        <p className="card border-withdraw text-withdraw" role="alert">
          {(report.error as Error).message}
        </p>
      )}
      {data && !report.isFetching && (
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
            <a className="btn mt-3" href={`/api/archive/impact.csv?${query}`} download>
              Download the list (CSV)
            </a>
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
