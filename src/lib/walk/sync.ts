/**
 * Keeps one assessment's edits flowing from the device to the server: every edit goes to the
 * IndexedDB edit queue first, is shown at once, and is sent in the order it was made whenever the
 * server can be reached. A newer server copy is merged when nobody else touched the same
 * fields; when they did, sending stops and the auditor picks, field by field, which value
 * stays. Framework-free: the React side subscribes (useSyncExternalStore) and supplies the
 * sender (a react-query mutation).
 */
import type { WalkDraft } from '@/lib/api/walk-through';
import type { Assessment, SavedDraft } from '@/lib/api/assessments';
import * as api from '@/lib/api/client';
import { OfflineError, type ApiResult, type UploadProgress } from '@/lib/api/client';
import type { Problem } from '@/lib/api/problem';
import type { PhotoRecord, TraceRecord } from '@/lib/api/uploads';
import {
  applyDraftPatch,
  asDraft,
  changedFields,
  findConflicts,
  toJson,
  withoutField,
  type FieldConflict,
} from './draft';
import { composeMergePatches, type JsonObject } from './merge-patch';
import * as editQueue from './edit-queue';
import type { QueuedEdit, QueuedEditBody, PhotoSource } from './edit-queue';

/**
 * One request the sync loop makes; the React side runs these through a react-query mutation.
 * A create (photo, trace) carries the `Idempotency-Key` of its queued edit: the edit's own
 * device id, stored with it in the edit queue, so every retry of one edit sends the same key and
 * a retry after a lost answer never makes a second row.
 */
export type SendJob =
  | { kind: 'patch'; assessmentId: string; rowVersion: number; patch: JsonObject }
  | {
      kind: 'photo';
      assessmentId: string;
      idempotencyKey: string;
      clientRef: string;
      itemKey: string;
      takenAt: string | null;
      fileName: string;
      blob: Blob;
      source?: PhotoSource | null;
      onProgress?: UploadProgress;
    }
  | {
      kind: 'trace';
      assessmentId: string;
      idempotencyKey: string;
      op: Extract<QueuedEditBody, { kind: 'trace' }>;
    }
  | { kind: 'removePhoto' | 'removeTrace'; assessmentId: string; serverId: string };

export type Sender = (job: SendJob) => Promise<ApiResult<unknown>>;

/** Calls the API directly; the default when no mutation is supplied. */
export const sendDirect: Sender = (job) => {
  switch (job.kind) {
    case 'patch':
      return api.patchAssessment(job.assessmentId, job.rowVersion, job.patch);
    case 'photo':
      return api.uploadPhoto(job.assessmentId, job, job.onProgress);
    case 'trace':
      return api.uploadTrace(job.assessmentId, job.op, job.idempotencyKey);
    case 'removePhoto':
      return api.removePhoto(job.assessmentId, job.serverId);
    case 'removeTrace':
      return api.removeTrace(job.assessmentId, job.serverId);
  }
};

/** `saved`: nothing waiting; `saving`: a request is out; `waiting`: edits kept on the device until the server answers. */
export type SyncPhase = 'loading' | 'saved' | 'saving' | 'waiting' | 'conflict' | 'closed';

/** A photo upload under way or stopped: bytes sent so far, and why it stopped (it stays queued). */
export interface PhotoUpload {
  sent: number;
  total: number;
  failed: string | null;
}

export interface RefusedEdit {
  id: number;
  what: string;
  message: string;
}

export interface SyncState {
  phase: SyncPhase;
  online: boolean;
  rowVersion: number;
  status: Assessment['status'];
  /** The last copy the server confirmed. */
  server: WalkDraft;
  /** What the auditor sees: the server copy with every waiting edit applied. */
  view: WalkDraft;
  pending: QueuedEdit[];
  /** Fields (answers, measurements, observation parts) and files waiting to be sent. */
  pendingCount: number;
  photos: PhotoRecord[];
  traces: TraceRecord[];
  conflicts: FieldConflict[];
  /** Edits the server refused (kept out of the queue so the rest can go); shown until dismissed. */
  refused: RefusedEdit[];
  /** Photo uploads by device id: progress of the one being sent, or why the last try stopped. */
  uploads: Readonly<Record<string, PhotoUpload>>;
  lastSavedAt: string | null;
}

export interface InitialAssessment {
  id: string;
  rowVersion: number;
  status: Assessment['status'];
  draft: WalkDraft;
  photos: PhotoRecord[];
  traces: TraceRecord[];
}

const RETRY_MS = 10_000;
const FLUSH_DELAY_MS = 400;

function describeProblem(problem: Problem): string {
  const fields = (problem.errors ?? []).map((e) => `${e.field}: ${e.message}`).join('; ');
  return [problem.detail ?? problem.title ?? `The server answered ${problem.status}`, fields]
    .filter(Boolean)
    .join(' — ');
}

function whatOf(op: QueuedEdit): string {
  if (op.kind === 'patch')
    return changedFields(op.patch)
      .map((f) => f.slice(1).join('.'))
      .join(', ');
  if (op.kind === 'photo') return `photo ${op.fileName}`;
  if (op.kind === 'trace') return `force trace ${op.fileName}`;
  return op.kind === 'removePhoto' ? 'removing a photo' : 'removing a force trace';
}

export class WalkSync {
  private state: SyncState;
  private listeners = new Set<() => void>();
  private chain: Promise<unknown> = Promise.resolve();
  private running: Promise<void> | null = null;
  private again = false;
  private flushTimer: ReturnType<typeof setTimeout> | undefined;
  private retryTimer: ReturnType<typeof setTimeout> | undefined;
  /** The server copy that caused the current conflict. */
  private theirs: Assessment | null = null;
  private refusedSeq = 0;
  private inFlight = new Set<number>();
  /** The photo being uploaded right now, by device id. */
  private uploading: string | null = null;
  sender: Sender = sendDirect;

  constructor(
    private readonly initial: InitialAssessment,
    private readonly onServerCopy: (assessment: SavedDraft) => void = () => {},
  ) {
    this.state = {
      phase: 'loading',
      // Read from navigator in start(): the server render and the first client render must agree.
      online: true,
      rowVersion: initial.rowVersion,
      status: initial.status,
      server: initial.draft,
      view: initial.draft,
      pending: [],
      pendingCount: 0,
      photos: initial.photos,
      traces: initial.traces,
      conflicts: [],
      refused: [],
      uploads: {},
      lastSavedAt: null,
    };
  }

  get assessmentId(): string {
    return this.initial.id;
  }

  subscribe = (listener: () => void): (() => void) => {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  };

  getState = (): SyncState => this.state;

  private set(partial: Partial<SyncState>): void {
    this.state = { ...this.state, ...partial };
    for (const listener of this.listeners) listener();
  }

  /** Runs IndexedDB work one piece at a time, so an edit and the sender never interleave. */
  private serial<T>(work: () => Promise<T>): Promise<T> {
    const next = this.chain.then(work, work);
    this.chain = next.catch(() => {});
    return next;
  }

  /**
   * Loads what the device kept. Edits still waiting were made against the device's last server
   * copy, so that copy stays their base (a newer page load must not hide someone else's change).
   */
  async start(): Promise<void> {
    await this.serial(async () => {
      const [snapshot, pending] = await Promise.all([
        editQueue.loadSnapshot(this.initial.id),
        editQueue.pendingOps(this.initial.id),
      ]);
      const initialSnapshot = {
        assessmentId: this.initial.id,
        rowVersion: this.initial.rowVersion,
        documents: toJson(this.initial.draft),
        savedAt: new Date().toISOString(),
      };
      const base =
        snapshot && (pending.length > 0 || snapshot.rowVersion > this.initial.rowVersion)
          ? snapshot
          : initialSnapshot;
      if (base === initialSnapshot) await editQueue.saveSnapshot(initialSnapshot);
      this.applyBase(base.rowVersion, asDraft(base.documents), pending);
    });
    if (typeof window !== 'undefined') {
      window.addEventListener('online', this.handleOnline);
      window.addEventListener('offline', this.handleOffline);
    }
    const online = typeof navigator === 'undefined' || navigator.onLine;
    if (this.state.status !== 'draft') {
      // Submitted (here or elsewhere): nothing more can be saved; edits left on the device are listed as not saved.
      const left = this.state.pending;
      for (const op of left)
        this.refuse(op, {
          status: 409,
          errors: [],
          detail: 'The assessment was submitted before this change reached the server.',
        });
      if (left.length) await this.serial(() => editQueue.removeOps(left));
      this.set({ phase: 'closed', online, pending: [], pendingCount: 0, view: this.state.server });
      return;
    }
    this.set({ phase: this.state.pending.length ? 'waiting' : 'saved', online });
    void this.flush();
  }

  stop(): void {
    if (typeof window !== 'undefined') {
      window.removeEventListener('online', this.handleOnline);
      window.removeEventListener('offline', this.handleOffline);
    }
    clearTimeout(this.flushTimer);
    clearTimeout(this.retryTimer);
  }

  private handleOnline = () => {
    this.set({ online: true });
    void this.flush();
  };

  private handleOffline = () => {
    const open = this.state.phase === 'saving' || this.state.phase === 'saved';
    this.set({ online: false, phase: open && this.state.pending.length ? 'waiting' : this.state.phase });
  };

  private applyBase(rowVersion: number, server: WalkDraft, pending: QueuedEdit[]): void {
    const patches = pending
      .filter((op): op is QueuedEdit & { kind: 'patch' } => op.kind === 'patch')
      .map((op) => op.patch);
    const pendingCount =
      new Set(patches.flatMap(changedFields).map((f) => f.join('.'))).size +
      pending.filter((op) => op.kind !== 'patch').length;
    this.set({
      rowVersion,
      server,
      view: patches.reduce(applyDraftPatch, server),
      pending,
      pendingCount,
    });
  }

  private async reloadPending(): Promise<void> {
    this.applyBase(this.state.rowVersion, this.state.server, await editQueue.pendingOps(this.initial.id));
  }

  /** Records an edit of the draft (a merge patch), shows it at once and schedules sending. */
  edit(patch: JsonObject): Promise<void> {
    if (this.state.status !== 'draft') return Promise.resolve();
    // Shown before IndexedDB answers, so typing never lags.
    this.set({ view: applyDraftPatch(this.state.view, patch) });
    return this.serial(async () => {
      const pending = await editQueue.pendingOps(this.initial.id);
      const last = pending[pending.length - 1];
      const folded =
        last?.kind === 'patch' && !this.inFlight.has(last.seq)
          ? composeMergePatches(last.patch, patch)
          : null;
      if (last?.kind === 'patch' && folded) await editQueue.replaceOp({ ...last, patch: folded });
      else await editQueue.enqueue(this.initial.id, { kind: 'patch', patch });
      await this.reloadPending();
      this.set({ phase: this.state.phase === 'conflict' ? 'conflict' : 'waiting' });
      this.scheduleFlush();
    });
  }

  /** Queues a photo with its bytes; it shows as waiting until uploaded. */
  addPhoto(
    photo: {
      clientRef: string;
      itemKey: string;
      fileName: string;
      takenAt: string | null;
      source?: PhotoSource | null;
    },
    blob: Blob,
  ): Promise<void> {
    return this.serial(async () => {
      await editQueue.enqueue(this.initial.id, { kind: 'photo', ...photo }, blob);
      await this.reloadPending();
      this.set({ phase: this.state.phase === 'conflict' ? 'conflict' : 'waiting' });
      this.scheduleFlush(0);
    });
  }

  addTrace(trace: Extract<QueuedEditBody, { kind: 'trace' }>): Promise<void> {
    return this.serial(async () => {
      await editQueue.enqueue(this.initial.id, trace);
      await this.reloadPending();
      this.set({ phase: this.state.phase === 'conflict' ? 'conflict' : 'waiting' });
      this.scheduleFlush(0);
    });
  }

  /** Removes a photo or trace: one still on the device is dropped; an uploaded one is deleted on the server. */
  remove(kind: 'removePhoto' | 'removeTrace', clientRef: string, serverId: string | null): Promise<void> {
    return this.serial(async () => {
      const waiting = this.state.pending.find(
        (op) =>
          (op.kind === 'photo' || op.kind === 'trace') &&
          op.clientRef === clientRef &&
          !this.inFlight.has(op.seq),
      );
      if (waiting) {
        await editQueue.removeOps([waiting]);
        this.setUpload(clientRef, null);
      } else if (serverId) await editQueue.enqueue(this.initial.id, { kind, clientRef, serverId });
      if (kind === 'removePhoto') this.set({ photos: this.state.photos.filter((p) => p.id !== serverId) });
      else this.set({ traces: this.state.traces.filter((t) => t.id !== serverId) });
      await this.reloadPending();
      this.scheduleFlush(0);
    });
  }

  /** The auditor's "Retry" on a stopped upload: try the queue again now instead of at the next timed retry. */
  retryUploads(): Promise<void> {
    const uploads = Object.fromEntries(
      Object.entries(this.state.uploads).map(([ref, u]) => [ref, { ...u, failed: null }]),
    );
    this.set({ uploads });
    return this.flush();
  }

  private setUpload(clientRef: string, upload: PhotoUpload | null): void {
    const uploads = { ...this.state.uploads };
    if (upload) uploads[clientRef] = upload;
    else delete uploads[clientRef];
    this.set({ uploads });
  }

  dismissRefused(id: number): void {
    this.set({ refused: this.state.refused.filter((r) => r.id !== id) });
  }

  private scheduleFlush(delay = FLUSH_DELAY_MS): void {
    clearTimeout(this.flushTimer);
    this.flushTimer = setTimeout(() => void this.flush(), delay);
  }

  private scheduleRetry(): void {
    clearTimeout(this.retryTimer);
    this.retryTimer = setTimeout(() => void this.flush(), RETRY_MS);
  }

  private refuse(op: QueuedEdit, problem: Problem): void {
    this.refusedSeq += 1;
    this.set({
      refused: [
        ...this.state.refused,
        { id: this.refusedSeq, what: whatOf(op), message: describeProblem(problem) },
      ],
    });
  }

  /** The server's copy became the base: remember it on the device too. */
  private async adopt(assessment: SavedDraft): Promise<void> {
    const draft = asDraft({
      answers: assessment.answers,
      measurements: assessment.measurements,
      observations: assessment.observations,
    } as never);
    await editQueue.saveSnapshot({
      assessmentId: this.initial.id,
      rowVersion: assessment.rowVersion,
      documents: toJson(draft),
      savedAt: new Date().toISOString(),
    });
    this.set({ status: assessment.status, server: draft, rowVersion: assessment.rowVersion });
    this.onServerCopy(assessment);
  }

  private blocked(): boolean {
    return this.state.phase === 'conflict' || this.state.phase === 'closed' || this.state.phase === 'loading';
  }

  /**
   * Sends waiting edits in order until none is left, the connection drops or a conflict needs
   * the auditor. A call while a round is under way asks for one more round and resolves when
   * that is done. Only the IndexedDB steps take the serial lock, so typing is never held up by
   * a slow request.
   */
  flush(): Promise<void> {
    if (this.blocked()) return Promise.resolve();
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = (async () => {
      do {
        this.again = false;
        await this.flushRound();
      } while (this.again && !this.blocked());
    })().finally(() => {
      this.running = null;
    });
    return this.running;
  }

  private async flushRound(): Promise<void> {
    clearTimeout(this.retryTimer);
    try {
      for (;;) {
        const pending = await this.serial(() => editQueue.pendingOps(this.initial.id));
        this.applyBase(this.state.rowVersion, this.state.server, pending);
        const head = pending[0];
        if (!head) {
          this.set({ phase: 'saved', online: true, lastSavedAt: new Date().toISOString() });
          return;
        }
        this.set({ phase: 'saving' });
        const carryOn = await this.send(head, pending);
        this.inFlight.clear();
        if (!carryOn) return;
      }
    } catch (error) {
      if (!(error instanceof OfflineError)) throw error;
      const stopped = this.uploading ? this.state.uploads[this.uploading] : undefined;
      if (this.uploading && stopped)
        this.setUpload(this.uploading, {
          ...stopped,
          failed: 'The connection dropped; the photo is kept on this phone.',
        });
      this.set({ phase: 'waiting', online: false });
      this.scheduleRetry();
    } finally {
      this.inFlight.clear();
      this.uploading = null;
    }
  }

  private drop(ops: QueuedEdit[]): Promise<void> {
    return this.serial(() => editQueue.removeOps(ops));
  }

  /** Sends the first waiting edit (with the patches right after it folded in); false stops the loop. */
  private async send(head: QueuedEdit, pending: QueuedEdit[]): Promise<boolean> {
    const id = this.initial.id;
    if (head.kind === 'patch') {
      const batch = [head];
      let patch = head.patch;
      for (const op of pending.slice(1)) {
        if (op.kind !== 'patch') break;
        const folded = composeMergePatches(patch, op.patch);
        if (!folded) break;
        patch = folded;
        batch.push(op);
      }
      batch.forEach((op) => this.inFlight.add(op.seq));
      const result = await this.sender({
        kind: 'patch',
        assessmentId: id,
        rowVersion: this.state.rowVersion,
        patch,
      });
      if (result.ok) {
        await this.drop(batch);
        await this.serial(() => this.adopt(result.value as SavedDraft));
        return true;
      }
      if (result.problem.status === 409 && result.problem.current)
        return this.handleConflict(result.problem.current);
      this.refuse(head, result.problem);
      await this.drop(batch);
      return true;
    }
    this.inFlight.add(head.seq);
    let result: ApiResult<unknown>;
    if (head.kind === 'photo') {
      const blob = await editQueue.photoBlob(head.clientRef);
      if (!blob) {
        await this.drop([head]);
        return true;
      }
      const ref = head.clientRef;
      this.uploading = ref;
      this.setUpload(ref, { sent: 0, total: blob.size, failed: null });
      result = await this.sender({
        kind: 'photo',
        assessmentId: id,
        idempotencyKey: ref,
        clientRef: ref,
        itemKey: head.itemKey,
        takenAt: head.takenAt,
        fileName: head.fileName,
        blob,
        source: head.source ?? null,
        onProgress: (sent, total) => {
          if (this.uploading === ref) this.setUpload(ref, { sent, total, failed: null });
        },
      });
      this.uploading = null;
      if (!result.ok && (result.problem.status >= 500 || result.problem.status === 429)) {
        // The server could not take it just now: keep it queued (in order) and try again later.
        this.setUpload(ref, { sent: 0, total: blob.size, failed: describeProblem(result.problem) });
        this.set({ phase: 'waiting' });
        this.scheduleRetry();
        return false;
      }
      this.setUpload(ref, null);
      if (result.ok)
        this.set({
          photos: [
            ...this.state.photos.filter((p) => p.clientRef !== head.clientRef),
            result.value as PhotoRecord,
          ],
        });
    } else if (head.kind === 'trace') {
      const { seq: _s, assessmentId: _a, createdAt: _c, ...op } = head;
      result = await this.sender({ kind: 'trace', assessmentId: id, idempotencyKey: head.clientRef, op });
      if (result.ok)
        this.set({
          traces: [
            ...this.state.traces.filter((t) => t.clientRef !== head.clientRef),
            result.value as TraceRecord,
          ],
        });
    } else {
      result = head.serverId
        ? await this.sender({ kind: head.kind, assessmentId: id, serverId: head.serverId })
        : { ok: true, value: null };
      // Already gone on the server is what we wanted.
      if (!result.ok && result.problem.status === 404) result = { ok: true, value: null };
    }
    if (!result.ok) {
      if (
        result.problem.status === 409 &&
        result.problem.current &&
        result.problem.current.status !== 'draft'
      )
        return this.close(result.problem.current);
      this.refuse(head, result.problem);
    }
    await this.drop([head]);
    return true;
  }

  /** The assessment was submitted from this device: nothing more is sent. */
  acceptSubmitted(assessment: Assessment): Promise<void> {
    return this.serial(() => this.adopt(assessment)).then(() => this.set({ phase: 'closed' }));
  }

  private async close(current: Assessment): Promise<boolean> {
    await this.serial(() => this.adopt(current));
    this.set({ phase: 'closed' });
    return false;
  }

  private async handleConflict(current: Assessment): Promise<boolean> {
    if (current.status !== 'draft') return this.close(current);
    const theirs = asDraft({
      answers: current.answers,
      measurements: current.measurements,
      observations: current.observations,
    } as never);
    const pending = await this.serial(() => editQueue.pendingOps(this.initial.id));
    const patches = pending
      .filter((op): op is QueuedEdit & { kind: 'patch' } => op.kind === 'patch')
      .map((op) => op.patch);
    const conflicts = findConflicts(this.state.server, theirs, patches);
    if (conflicts.length === 0) {
      // Someone else changed other fields: take their copy as the base and send ours again.
      await this.serial(() => this.adopt(current));
      return true;
    }
    this.theirs = current;
    this.set({ phase: 'conflict', conflicts });
    return false;
  }

  /**
   * The auditor's decision for each conflicting field: `mine` sends this device's value over
   * the newer copy, `theirs` drops this device's edit of that field. Then sending resumes.
   */
  resolveConflicts(choices: ReadonlyMap<string, 'mine' | 'theirs'>): Promise<void> {
    const theirs = this.theirs;
    if (!theirs) return Promise.resolve();
    return this.serial(async () => {
      const pending = await editQueue.pendingOps(this.initial.id);
      for (const op of pending) {
        if (op.kind !== 'patch') continue;
        let patch = op.patch;
        for (const conflict of this.state.conflicts) {
          if (choices.get(conflict.field.join('.')) === 'theirs') patch = withoutField(patch, conflict.field);
        }
        if (Object.keys(patch).length === 0) await editQueue.removeOps([op]);
        else if (patch !== op.patch) await editQueue.replaceOp({ ...op, patch });
      }
      this.theirs = null;
      await this.adopt(theirs);
      this.set({ conflicts: [], phase: 'waiting' });
      await this.reloadPending();
    }).then(() => this.flush());
  }
}
