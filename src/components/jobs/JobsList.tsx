/** The owner's background jobs: counts by status and the list, refreshed while the page is open; retry for failed and dead ones. */
import { useEffect, useState } from 'react';
import type { JobList, JobStatus } from '@/lib/api/jobs';
import { jobList, retryJob } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';
import { formatDayTime } from '@/lib/vocabulary';

interface Props {
  initial: JobList;
  timeZone: string;
}

const STATUS_WORDS: Record<JobStatus, string> = {
  queued: 'Queued',
  running: 'Running',
  failed: 'Failed',
  dead: 'Given up',
};
const statusClass: Record<JobStatus, string> = {
  queued: 'text-iron-700',
  running: 'text-clear',
  failed: 'text-remedy',
  dead: 'text-withdraw',
};

export default function JobsList({ initial, timeZone }: Props) {
  const [list, setList] = useState(initial);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const when = { format: (date: Date) => formatDayTime(date, timeZone) };

  const refresh = async () => {
    const answer = await jobList<JobList>();
    if (answer.ok) setList(answer.value);
  };
  useEffect(() => {
    const timer = setInterval(() => void refresh(), 5000);
    return () => clearInterval(timer);
  }, []);

  const retry = async (id: string) => {
    setBusy(id);
    setMessage(null);
    const answer = await retryJob(id);
    setMessage(answer.ok ? 'Sent round again.' : problemMessage(answer.problem));
    setBusy(null);
    await refresh();
  };

  return (
    <div className="mt-4 grid max-w-4xl gap-4">
      <p className="card" aria-live="polite">
        {(Object.keys(STATUS_WORDS) as JobStatus[]).map((s, i) => (
          <span key={s}>
            {i > 0 && ' · '}
            <span className={`font-semibold ${statusClass[s]}`}>{list.counts[s]}</span>{' '}
            {STATUS_WORDS[s].toLowerCase()}
          </span>
        ))}
      </p>
      {message && (
        <p className="card" role="status">
          {message}
        </p>
      )}
      {list.items.length === 0 ? (
        <p className="card">Nothing waiting, running or failed.</p>
      ) : (
        <ul className="grid gap-2" aria-label="Jobs, newest first">
          {list.items.map((job) => (
            <li key={job.id} className="card" data-job-id={job.id} data-job-status={job.status}>
              <div className="flex flex-wrap items-center gap-2">
                <span className={`font-semibold ${statusClass[job.status]}`}>{STATUS_WORDS[job.status]}</span>
                <span className="font-semibold">{job.queueLabel}</span>
                <span className="text-sm text-iron-600">{job.about}</span>
              </div>
              <p className="mt-1 text-sm text-iron-600">
                {/* A dead job is made when its message is given up on. */}
                {job.status === 'dead' ? 'Given up' : 'Queued'} {when.format(new Date(job.createdAt))}
                {job.status === 'queued' && ` · runs from ${when.format(new Date(job.startAfter))}`}
                {job.startedAt &&
                  job.status === 'running' &&
                  ` · started ${when.format(new Date(job.startedAt))}`}
                {job.retryCount > 0 && ` · retried ${job.retryCount}×`}
              </p>
              {job.error && <p className="mt-1 text-sm text-withdraw">{job.error}</p>}
              {job.canRetry && (
                <button
                  type="button"
                  className="btn mt-2"
                  disabled={busy === job.id}
                  aria-label={`Retry: ${job.queueLabel}, ${job.about}`}
                  onClick={() => void retry(job.id)}
                >
                  Retry
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
