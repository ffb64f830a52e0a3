/** The owner's background jobs page and GET /api/jobs: what they answer. */
export type JobStatus = 'queued' | 'running' | 'failed' | 'dead';
export type JobQueue =
  'mail' | 'mail-dead' | 'reinspection-sweep' | 'reinspection-reminders' | 'impact-slice';

export interface JobSummary {
  id: string;
  queue: JobQueue;
  /** The queue in words. */
  queueLabel: string;
  status: JobStatus;
  /** What the job is about, in words (a message's subject, the ruleset version of an impact run). */
  about: string;
  createdAt: string;
  /** When it may run next (queued) or was due (others). */
  startAfter: string;
  startedAt: string | null;
  retryCount: number;
  error: string | null;
  canRetry: boolean;
}

export interface JobList {
  items: JobSummary[];
  counts: Record<JobStatus, number>;
}
