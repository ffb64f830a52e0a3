/**
 * Worker threads for the ruleset impact: re-scoring is pure CPU, so it runs off the server's
 * main thread, each thread reading and scoring its own slices with its own database connection,
 * while the main thread keeps answering requests.
 *
 * One pool per process (`acquireSharedPool` / `releaseSharedPool`) serves both users: a report or
 * CSV asked for over HTTP (impact.ts `rescoreArchive`) and the queued impact runs (impact-runs.ts).
 * However many reports are asked for at once, the process runs at most IMPACT_WORKERS threads;
 * their slices queue on those threads. The pool starts with its first user and closes a minute
 * after its last one is done (threads hold memory and database connections of their own).
 *
 * A worker imports the module that holds `rescoreSlice` (impact.ts, by its own URL: the source
 * file under tsx, with tsx's loader registered in the worker; the bundled chunk in the built
 * server) and finds the function on globalThis.
 * Where that import cannot work (the Vite dev server serves TypeScript only through itself), the
 * pool does not start and the caller scores in its own thread.
 *
 * A slice whose scoring throws rejects that slice only. A thread that dies (an uncaught error, an
 * exit, running out of memory) rejects the slices it held, and a new thread takes its place; the
 * pool fails what it still holds only when no thread can be started again.
 *
 * IMPACT_WORKERS sets the thread count (0 turns workers off); by default one per core, at most 4,
 * and one even on a single core, so scoring never blocks the thread that answers requests.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import type { ImpactOutcome } from '@/lib/api/impact';
import type { ImpactSlice } from './impact';

const workerSource = `
const { parentPort, workerData } = require('node:worker_threads');
(async () => {
  // Under tsx (benchmarks, CLI, tests) the module is TypeScript: a worker needs tsx's loader of its own.
  if (workerData.moduleUrl.endsWith('.ts')) (await import('tsx/esm/api')).register();
  await import(workerData.moduleUrl);
  const rescoreSlice = globalThis[Symbol.for('latchwell.impact.rescoreSlice')];
  if (typeof rescoreSlice !== 'function') throw new Error('rescoreSlice was not registered by ' + workerData.moduleUrl);
  parentPort.on('message', ({ id, slice }) => {
    Promise.resolve()
      .then(() => rescoreSlice(slice))
      .then(
        (outcomes) => parentPort.postMessage({ id, outcomes }),
        (error) => parentPort.postMessage({ id, error: String((error && error.message) || error) }),
      );
  });
  parentPort.postMessage({ ready: true });
})().catch((error) => parentPort.postMessage({ failed: String((error && error.message) || error) }));
`;

export interface RescorePool {
  /** Threads the pool was started with. */
  size: number;
  run(slice: ImpactSlice): Promise<ImpactOutcome[]>;
  close(): Promise<void>;
}

interface PendingJob {
  id: number;
  slice: ImpactSlice;
  resolve: (outcomes: ImpactOutcome[]) => void;
  reject: (error: Error) => void;
}

/** Threads for a pool: IMPACT_WORKERS when set, else one per core (at most 4), `minimum` at least. */
export function workerCount(minimum = 0): number {
  const configured = process.env.IMPACT_WORKERS;
  if (configured !== undefined && configured !== '')
    return Math.max(0, Math.min(16, Number(configured) || 0));
  const cores = os.availableParallelism();
  return Math.max(minimum, cores >= 2 ? Math.min(4, cores) : 0);
}

function startWorker(moduleUrl: string): Promise<Worker | null> {
  return new Promise((resolve) => {
    let worker: Worker;
    try {
      worker = new Worker(workerSource, { eval: true, workerData: { moduleUrl } });
    } catch {
      resolve(null);
      return;
    }
    const timer = setTimeout(() => {
      void worker.terminate();
      settle(null);
    }, 30_000);
    const settle = (value: Worker | null) => {
      clearTimeout(timer);
      worker.off('message', onMessage);
      worker.off('error', onError);
      worker.off('exit', onError);
      resolve(value);
    };
    const onMessage = (message: { ready?: boolean; failed?: string }) => {
      if (message.ready) {
        // Until the pool adopts it, an error must not go unheard (that would end the process).
        worker.on('error', () => {});
        settle(worker);
      } else if (message.failed) {
        void worker.terminate();
        settle(null);
      }
    };
    const onError = () => settle(null);
    worker.on('message', onMessage);
    worker.on('error', onError);
    worker.on('exit', onError);
  });
}

interface Slot {
  worker: Worker;
  jobs: Map<number, PendingJob>;
}

/** Starts the pool, or answers null when workers are off or cannot load the module here. */
export async function startRescorePool(
  moduleUrl: string,
  size = workerCount(),
  options: { unref?: boolean } = {},
): Promise<RescorePool | null> {
  if (size <= 0 || !moduleUrl.startsWith('file:')) return null;
  const started = await Promise.all(Array.from({ length: size }, () => startWorker(moduleUrl)));
  const first = started.filter((w): w is Worker => w !== null);
  if (first.length < started.length) {
    await Promise.all(first.map((w) => w.terminate()));
    return null;
  }
  const slots = new Set<Slot>();
  const waiting: PendingJob[] = [];
  let restarting = 0;
  let nextId = 0;
  let closed = false;

  const dispatch = (job: PendingJob) => {
    let best: Slot | undefined;
    for (const slot of slots) if (!best || slot.jobs.size < best.jobs.size) best = slot;
    if (!best) {
      if (restarting > 0) waiting.push(job);
      else job.reject(new Error('no re-scoring thread could be started'));
      return;
    }
    best.jobs.set(job.id, job);
    best.worker.postMessage({ id: job.id, slice: job.slice });
  };

  const adopt = (worker: Worker) => {
    const slot: Slot = { worker, jobs: new Map() };
    if (options.unref) worker.unref();
    let why = 'it exited';
    worker.on('message', (message: { id: number; outcomes?: ImpactOutcome[]; error?: string }) => {
      const job = slot.jobs.get(message.id);
      if (!job) return;
      slot.jobs.delete(message.id);
      if (message.error !== undefined) job.reject(new Error(message.error));
      else job.resolve(message.outcomes ?? []);
    });
    worker.on('error', (error) => {
      why = error.message;
    });
    const exited = (code: number) => {
      slots.delete(slot);
      for (const job of slot.jobs.values())
        job.reject(
          new Error(`the re-scoring thread stopped while scoring this slice (${why}, code ${code})`),
        );
      slot.jobs.clear();
      if (closed) return;
      restarting++;
      void startWorker(moduleUrl).then((replacement) => {
        restarting--;
        if (replacement && !closed) adopt(replacement);
        else if (replacement) void replacement.terminate();
        for (const job of waiting.splice(0)) dispatch(job);
      });
    };
    // A thread that stopped between starting and being adopted is replaced at once.
    if (worker.threadId === -1) {
      exited(-1);
      return;
    }
    slots.add(slot);
    worker.on('exit', exited);
    for (const job of waiting.splice(0)) dispatch(job);
  };
  for (const worker of first) adopt(worker);

  return {
    size,
    run(slice) {
      if (closed) return Promise.reject(new Error('the re-scoring pool is closed'));
      return new Promise<ImpactOutcome[]>((resolve, reject) =>
        dispatch({ id: nextId++, slice, resolve, reject }),
      );
    },
    async close() {
      closed = true;
      const error = new Error('the re-scoring pool was closed');
      for (const job of waiting.splice(0)) job.reject(error);
      const all = [...slots];
      for (const slot of all) {
        for (const job of slot.jobs.values()) job.reject(error);
        slot.jobs.clear();
      }
      await Promise.all(all.map((s) => s.worker.terminate()));
    },
  };
}

let shared: Promise<RescorePool | null> | undefined;
let sharedUsers = 0;
let sharedIdleTimer: NodeJS.Timeout | undefined;

/** How long the shared pool outlives its last user (IMPACT_POOL_IDLE_MS, default a minute). */
function sharedIdleMs(): number {
  const configured = Number(process.env.IMPACT_POOL_IDLE_MS);
  return Number.isFinite(configured) && configured >= 0 ? configured : 60_000;
}

/**
 * This process's re-scoring threads (IMPACT_WORKERS, at least one unless 0), started by the first
 * caller and shared by every later one; null where threads are off or cannot load the module (the
 * dev server), and the caller then scores in its own thread. Each acquire needs one release.
 */
export function acquireSharedPool(moduleUrl: string): Promise<RescorePool | null> {
  sharedUsers++;
  clearTimeout(sharedIdleTimer);
  shared ??= startRescorePool(moduleUrl, workerCount(1), { unref: true }).catch(() => null);
  return shared;
}

/** Done with the shared pool; once nobody uses it for the idle time, its threads end. */
export function releaseSharedPool(): void {
  sharedUsers = Math.max(0, sharedUsers - 1);
  if (sharedUsers > 0) return;
  clearTimeout(sharedIdleTimer);
  sharedIdleTimer = setTimeout(() => {
    const closing = shared;
    if (sharedUsers > 0 || !closing) return;
    shared = undefined;
    void closing.then((pool) => pool?.close());
  }, sharedIdleMs());
  sharedIdleTimer.unref();
}
