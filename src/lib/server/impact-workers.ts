/**
 * Worker threads for the ruleset impact: re-scoring is pure CPU, so a large archive is spread
 * over one thread per core, each reading and scoring its own slices with its own database
 * connection, while the main thread keeps answering requests.
 *
 * A worker imports the module that holds `rescoreSlice` (impact.ts, by its own URL: the source
 * file under tsx, with tsx's loader registered in the worker; the bundled chunk in the built
 * server) and finds the function on globalThis.
 * Where that import cannot work (the Vite dev server serves TypeScript only through itself), the
 * pool does not start and the caller scores in its own thread.
 *
 * IMPACT_WORKERS sets the thread count (0 turns workers off); by default one per core, at most 4,
 * none on a single core. (Measured on two cores: 100,000 assessments in 29 s with two workers
 * against 34 s in one thread when the machine was otherwise idle; on cores already saturated by
 * other work one thread did better. Without workers the scoring yields to other requests every
 * hundred assessments.)
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import type { ImpactOutcome } from '@/lib/api/impact';
import type { ImpactSlice } from './impact';

const workerSource = `
const { parentPort, workerData } = require('node:worker_threads');
(async () => {
  // Under tsx (benchmarks, CLI) the module is TypeScript: a worker needs tsx's loader of its own.
  if (workerData.moduleUrl.endsWith('.ts')) (await import('tsx/esm/api')).register();
  await import(workerData.moduleUrl);
  const rescoreSlice = globalThis[Symbol.for('latchwell.impact.rescoreSlice')];
  if (typeof rescoreSlice !== 'function') throw new Error('rescoreSlice was not registered by ' + workerData.moduleUrl);
  parentPort.on('message', ({ id, slice }) => {
    rescoreSlice(slice).then(
      (outcomes) => parentPort.postMessage({ id, outcomes }),
      (error) => parentPort.postMessage({ id, error: String((error && error.stack) || error) }),
    );
  });
  parentPort.postMessage({ ready: true });
})().catch((error) => parentPort.postMessage({ failed: String((error && error.message) || error) }));
`;

export interface RescorePool {
  size: number;
  run(slice: ImpactSlice): Promise<ImpactOutcome[]>;
  close(): Promise<void>;
}

interface PendingJob {
  resolve: (outcomes: ImpactOutcome[]) => void;
  reject: (error: Error) => void;
}

function workerCount(): number {
  const configured = process.env.IMPACT_WORKERS;
  if (configured !== undefined && configured !== '')
    return Math.max(0, Math.min(16, Number(configured) || 0));
  const cores = os.availableParallelism();
  return cores >= 2 ? Math.min(4, cores) : 0;
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
      resolve(null);
    }, 30_000);
    const settle = (value: Worker | null) => {
      clearTimeout(timer);
      worker.off('message', onMessage);
      worker.off('error', onError);
      resolve(value);
    };
    const onMessage = (message: { ready?: boolean; failed?: string }) => {
      if (message.ready) settle(worker);
      else if (message.failed) {
        void worker.terminate();
        settle(null);
      }
    };
    const onError = () => settle(null);
    worker.on('message', onMessage);
    worker.once('error', onError);
  });
}

/** Starts the pool, or answers null when workers are off or cannot load the module here. */
export async function startRescorePool(moduleUrl: string): Promise<RescorePool | null> {
  const size = workerCount();
  if (size === 0 || !moduleUrl.startsWith('file:')) return null;
  const started = await Promise.all(Array.from({ length: size }, () => startWorker(moduleUrl)));
  const workers = started.filter((w): w is Worker => w !== null);
  if (workers.length < started.length) {
    await Promise.all(workers.map((w) => w.terminate()));
    return null;
  }
  const pending = new Map<number, PendingJob>();
  const load = new Map<Worker, number>(workers.map((w) => [w, 0]));
  let nextId = 0;
  let closed = false;
  for (const worker of workers) {
    worker.on('message', (message: { id: number; outcomes?: ImpactOutcome[]; error?: string }) => {
      const job = pending.get(message.id);
      if (!job) return;
      pending.delete(message.id);
      load.set(worker, (load.get(worker) ?? 1) - 1);
      if (message.error) job.reject(new Error(message.error));
      else job.resolve(message.outcomes ?? []);
    });
    worker.on('error', (error) => {
      for (const job of pending.values()) job.reject(error);
      pending.clear();
    });
  }
  return {
    size: workers.length,
    run(slice) {
      if (closed) return Promise.reject(new Error('the re-scoring pool is closed'));
      const worker = [...load].sort((a, b) => a[1] - b[1])[0]![0];
      load.set(worker, (load.get(worker) ?? 0) + 1);
      const id = nextId++;
      return new Promise<ImpactOutcome[]>((resolve, reject) => {
        pending.set(id, { resolve, reject });
        worker.postMessage({ id, slice });
      });
    },
    async close() {
      closed = true;
      for (const job of pending.values()) job.reject(new Error('the re-scoring pool was closed'));
      pending.clear();
      await Promise.all(workers.map((w) => w.terminate()));
    },
  };
}
