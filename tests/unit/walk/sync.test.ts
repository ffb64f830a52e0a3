/**
 * The device's edit queue and its sync loop against a fake server, with IndexedDB from
 * fake-indexeddb: order, folding, offline and reload, conflicts, refusals.
 */
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import type { Assessment } from '@/lib/api/assessments';
import { applyMergePatch } from '@/lib/merge-patch';
import { OfflineError, type ApiResult } from '@/lib/api/client';
import { emptyDraft } from '@/lib/walk/draft';
import type { JsonObject } from '@/lib/walk/merge-patch';
import { WalkSync, type SendJob } from '@/lib/walk/sync';

let counter = 0;
const newId = () => `00000000-0000-4000-8000-${String(++counter).padStart(12, '0')}`;

/** A server holding one draft, answering the sync loop's requests as the API does. */
function fakeServer() {
  const row = {
    rowVersion: 1,
    status: 'draft' as Assessment['status'],
    answers: {} as JsonObject,
    measurements: {} as JsonObject,
    observations: {} as JsonObject,
  };
  const calls: SendJob[] = [];
  const state = { offline: false, refuseNext: false };
  const current = () => ({ ...structuredClone(row) }) as unknown as Assessment;
  const send = async (job: SendJob): Promise<ApiResult<unknown>> => {
    calls.push(job);
    if (state.offline) throw new OfflineError();
    if (job.kind === 'patch') {
      if (state.refuseNext) {
        state.refuseNext = false;
        return {
          ok: false,
          problem: {
            status: 422,
            detail: 'Some fields are missing or invalid.',
            errors: [{ field: 'answers.x.value', message: 'must be one of: yes, no, na' }],
          },
        };
      }
      if (job.rowVersion !== row.rowVersion)
        return { ok: false, problem: { status: 409, errors: [], current: current() } };
      row.answers = applyMergePatch(row.answers, job.patch.answers ?? {}) as JsonObject;
      row.observations = applyMergePatch(row.observations, job.patch.observations ?? {}) as JsonObject;
      row.rowVersion += 1;
      return { ok: true, value: current() };
    }
    if (job.kind === 'photo') {
      return {
        ok: true,
        value: {
          id: newId(),
          clientRef: job.clientRef,
          itemKey: job.itemKey,
          thumbUrl: '/t',
          displayUrl: '/d',
        },
      };
    }
    return { ok: true, value: null };
  };
  /** Someone else saves: their change lands and the row version moves on. */
  const otherDeviceSaves = (answers: JsonObject) => {
    row.answers = applyMergePatch(row.answers, answers) as JsonObject;
    row.rowVersion += 1;
  };
  return { row, calls, state, send, otherDeviceSaves };
}

async function open(id: string, server: ReturnType<typeof fakeServer>, rowVersion = 1) {
  const sync = new WalkSync({
    id,
    rowVersion,
    status: 'draft',
    draft: emptyDraft(),
    photos: [],
    traces: [],
  });
  sync.sender = server.send;
  await sync.start();
  return sync;
}

const patches = (calls: SendJob[]) =>
  calls.filter((c): c is Extract<SendJob, { kind: 'patch' }> => c.kind === 'patch');

describe("the device's edit queue", () => {
  it('sends edits made in a row as one save, over the row version it read', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    await sync.edit({ answers: { latchFitted: { value: 'yes' } } });
    await sync.edit({ observations: { site: { publicAccess: false } } });
    await sync.flush();
    expect(patches(server.calls)).toEqual([
      expect.objectContaining({
        rowVersion: 1,
        patch: {
          answers: { latchFitted: { value: 'yes' } },
          observations: { site: { publicAccess: false } },
        },
      }),
    ]);
    expect(sync.getState()).toMatchObject({ phase: 'saved', rowVersion: 2, pendingCount: 0 });
    sync.stop();
  });

  it('keeps edits made without signal on the device, through a reload, and sends them when the signal returns', async () => {
    const server = fakeServer();
    const id = newId();
    server.state.offline = true;
    const first = await open(id, server);
    await first.edit({ answers: { ownerShown: { value: 'yes' } } });
    await first.flush();
    expect(first.getState()).toMatchObject({ phase: 'waiting', online: false, pendingCount: 1 });
    first.stop();

    // The page is opened again (from the cache, still without signal): the edit is still there.
    const reopened = await open(id, server);
    expect(reopened.getState().view.answers.ownerShown).toEqual({ value: 'yes' });
    expect(reopened.getState().pendingCount).toBe(1);
    expect(server.row.answers).toEqual({});

    server.state.offline = false;
    await reopened.flush();
    expect(server.row.answers).toEqual({ ownerShown: { value: 'yes' } });
    expect(reopened.getState()).toMatchObject({ phase: 'saved', pendingCount: 0 });
    reopened.stop();
  });

  it('sends a photo in its place among the edits: not before the edit made earlier, not folded with the one after', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.state.offline = true;
    await sync.edit({ answers: { positiveStopClosed: { value: 'yes' } } });
    await sync.addPhoto(
      {
        clientRef: '11111111-1111-4111-8111-111111111111',
        itemKey: 'positiveStopClosed',
        fileName: 'stop.jpg',
        takenAt: null,
      },
      new Blob(['jpeg']),
    );
    await sync.edit({ answers: { manualLeft: { value: 'no' } } });
    await sync.flush();
    server.calls.length = 0;
    server.state.offline = false;
    await sync.flush();
    expect(server.calls.map((c) => c.kind)).toEqual(['patch', 'photo', 'patch']);
    expect(sync.getState().photos.map((p) => p.itemKey)).toEqual(['positiveStopClosed']);
    sync.stop();
  });

  it('re-sends over a newer copy when the other save touched different items', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.otherDeviceSaves({ latchFitted: { value: 'no' } });
    await sync.edit({ answers: { ownerShown: { value: 'yes' } } });
    await sync.flush();
    expect(patches(server.calls).map((c) => c.rowVersion)).toEqual([1, 2]);
    expect(server.row.answers).toEqual({ latchFitted: { value: 'no' }, ownerShown: { value: 'yes' } });
    expect(sync.getState().view.answers).toEqual(server.row.answers);
    sync.stop();
  });

  it('stops and asks when the other save changed the same item; nothing is overwritten until the auditor chooses', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.otherDeviceSaves({ latchFitted: { value: 'no' } });
    await sync.edit({ answers: { latchFitted: { value: 'yes' } } });
    await sync.flush();
    expect(sync.getState().phase).toBe('conflict');
    expect(sync.getState().conflicts).toEqual([
      { field: ['answers', 'latchFitted'], base: undefined, theirs: { value: 'no' }, mine: { value: 'yes' } },
    ]);
    expect(server.row.answers.latchFitted).toEqual({ value: 'no' });

    await sync.resolveConflicts(new Map([['answers.latchFitted', 'mine']]));
    expect(server.row.answers.latchFitted).toEqual({ value: 'yes' });
    expect(sync.getState()).toMatchObject({ phase: 'saved', conflicts: [] });
    sync.stop();
  });

  it('drops this device’s edit when the auditor keeps the other value', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.otherDeviceSaves({ latchFitted: { value: 'no' } });
    await sync.edit({ answers: { latchFitted: { value: 'yes' }, ownerShown: { value: 'yes' } } });
    await sync.flush();
    await sync.resolveConflicts(new Map([['answers.latchFitted', 'theirs']]));
    expect(server.row.answers).toEqual({ latchFitted: { value: 'no' }, ownerShown: { value: 'yes' } });
    expect(sync.getState().view.answers.latchFitted).toEqual({ value: 'no' });
    sync.stop();
  });

  it('reports an edit the server refuses, with its reason, and still sends the ones after it', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.state.refuseNext = true;
    await sync.edit({ answers: { latchFitted: { value: 'maybe' } } });
    await sync.flush();
    await sync.edit({ answers: { ownerShown: { value: 'yes' } } });
    await sync.flush();
    expect(sync.getState().refused).toEqual([
      expect.objectContaining({
        what: 'latchFitted',
        message: expect.stringMatching(/answers\.x\.value: must be one of/),
      }),
    ]);
    expect(server.row.answers).toEqual({ ownerShown: { value: 'yes' } });
    sync.stop();
  });

  it('lists edits still on the device as not saved when the assessment was submitted meanwhile, and sends nothing', async () => {
    const server = fakeServer();
    const id = newId();
    server.state.offline = true;
    const before = await open(id, server);
    await before.edit({ answers: { manualLeft: { value: 'yes' } } });
    await before.flush();
    before.stop();
    server.state.offline = false;
    server.calls.length = 0;

    const after = new WalkSync({
      id,
      rowVersion: 3,
      status: 'scored',
      draft: emptyDraft(),
      photos: [],
      traces: [],
    });
    after.sender = server.send;
    await after.start();
    expect(after.getState()).toMatchObject({ phase: 'closed', pendingCount: 0 });
    expect(after.getState().refused).toEqual([
      expect.objectContaining({
        what: 'manualLeft',
        message: expect.stringMatching(/submitted before this change/),
      }),
    ]);
    expect(after.getState().view.answers).toEqual({});
    await after.flush();
    expect(server.calls).toEqual([]);
    after.stop();
  });
});

describe("creates from the device's edit queue", () => {
  const traceOp = (clientRef: string) => ({
    kind: 'trace' as const,
    clientRef,
    itemKey: 'forceTest',
    fileName: 'closing.csv',
    csv: 'time (s),force (N)\n0,0',
    location: 'closing_edge',
    direction: 'closing' as const,
    gapMm: 50,
  });

  it('sends one Idempotency-Key per queued create and the same key again on every retry', async () => {
    const server = fakeServer();
    const sync = await open(newId(), server);
    server.state.offline = true;
    await sync.addPhoto(
      {
        clientRef: '22222222-2222-4222-8222-222222222222',
        itemKey: 'closingEdge',
        fileName: 'a.jpg',
        takenAt: null,
      },
      new Blob(['a']),
    );
    await sync.addTrace(traceOp('33333333-3333-4333-8333-333333333333'));
    await sync.flush();
    await sync.flush();
    server.state.offline = false;
    await sync.flush();
    const keysOf = (kind: 'photo' | 'trace') =>
      server.calls.flatMap((c) => (c.kind === kind ? [c.idempotencyKey] : []));
    // Tries that got no answer, then the one that went through: always the same key for one edit.
    expect(keysOf('photo').length).toBeGreaterThanOrEqual(2);
    expect(new Set(keysOf('photo'))).toEqual(new Set(['22222222-2222-4222-8222-222222222222']));
    expect(new Set(keysOf('trace'))).toEqual(new Set(['33333333-3333-4333-8333-333333333333']));
    expect(sync.getState().pendingCount).toBe(0);
    sync.stop();
  });

  it('puts the key on the wire as the Idempotency-Key header', async () => {
    const seen: Headers[] = [];
    const realFetch = globalThis.fetch;
    const realXhr = globalThis.XMLHttpRequest;
    globalThis.fetch = (async (_input: RequestInfo | URL, init?: RequestInit) => {
      seen.push(new Headers(init?.headers));
      return new Response('{}', { status: 201, headers: { 'content-type': 'application/json' } });
    }) as typeof fetch;
    // Photos go through XMLHttpRequest (the one browser API with upload progress): a stand-in
    // that records its headers and answers 201.
    class RecordingXhr {
      headers = new Headers();
      upload = {};
      status = 0;
      responseText = '';
      withCredentials = false;
      onload: (() => void) | null = null;
      open() {}
      setRequestHeader(name: string, value: string) {
        this.headers.set(name, value);
      }
      getResponseHeader(name: string) {
        return name.toLowerCase() === 'content-type' ? 'application/json' : null;
      }
      send() {
        seen.push(this.headers);
        this.status = 201;
        this.responseText = '{}';
        queueMicrotask(() => this.onload?.());
      }
    }
    globalThis.XMLHttpRequest = RecordingXhr as unknown as typeof XMLHttpRequest;
    try {
      const { sendDirect } = await import('@/lib/walk/sync');
      const key = '44444444-4444-4444-8444-444444444444';
      await sendDirect({ kind: 'trace', assessmentId: newId(), idempotencyKey: key, op: traceOp(key) });
      await sendDirect({
        kind: 'photo',
        assessmentId: newId(),
        idempotencyKey: key,
        clientRef: key,
        itemKey: 'closingEdge',
        takenAt: null,
        fileName: 'a.jpg',
        blob: new Blob(['a']),
      });
    } finally {
      globalThis.fetch = realFetch;
      globalThis.XMLHttpRequest = realXhr;
    }
    expect(seen.map((h) => h.get('idempotency-key'))).toEqual([
      '44444444-4444-4444-8444-444444444444',
      '44444444-4444-4444-8444-444444444444',
    ]);
  });
});
