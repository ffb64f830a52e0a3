/**
 * The re-scoring thread pool (src/lib/server/impact-workers.ts) with real worker threads: a
 * slice that throws fails alone, a thread that dies fails the slice it held and is replaced, and
 * nothing is left waiting for ever.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { startRescorePool, type RescorePool } from '../../../src/lib/server/impact-workers';
import type { ImpactSlice } from '../../../src/lib/server/impact';

const fixture = new URL('./fixtures/rescore-thread.ts', import.meta.url).href;
const slice = (upToId: string) => ({ upToId }) as unknown as ImpactSlice;
const answer = async (pool: RescorePool, id: string) =>
  (await pool.run(slice(id))) as unknown as [{ assessmentId: string; threadId: number }];

let pool: RescorePool | null = null;
afterEach(async () => {
  await pool?.close();
  pool = null;
});

describe('re-scoring thread pool', () => {
  it('fails a slice whose scoring throws, and the same thread goes on with the next', async () => {
    pool = await startRescorePool(fixture, 1);
    expect(pool).not.toBeNull();
    const [before] = await answer(pool!, 'a');
    await expect(pool!.run(slice('throw'))).rejects.toThrow('the ruleset could not be read');
    const [after] = await answer(pool!, 'b');
    expect(after).toEqual({ assessmentId: 'b', threadId: before.threadId });
  }, 60_000);

  it('fails the slice a thread held when the thread exits or crashes, and replaces the thread', async () => {
    pool = await startRescorePool(fixture, 1);
    const [first] = await answer(pool!, 'a');
    await expect(pool!.run(slice('exit'))).rejects.toThrow(/stopped while scoring this slice.*code 3/);
    const [second] = await answer(pool!, 'b');
    expect(second.assessmentId).toBe('b');
    expect(second.threadId).not.toBe(first.threadId);
    await expect(pool!.run(slice('crash'))).rejects.toThrow(/stopped while scoring.*the thread crashed/);
    const [third] = await answer(pool!, 'c');
    expect(third.threadId).not.toBe(second.threadId);
  }, 60_000);

  it('keeps the other threads’ slices when one thread dies', async () => {
    pool = await startRescorePool(fixture, 2);
    // The least busy thread takes each slice, so with two threads these two land on different
    // threads (a third would share the crashing thread and, by timing, go down with it or not).
    const results = await Promise.allSettled([pool!.run(slice('crash')), pool!.run(slice('x'))]);
    expect(results.map((r) => r.status)).toEqual(['rejected', 'fulfilled']);
    // And the pool still scores afterwards, on a replacement thread if need be.
    await expect(pool!.run(slice('y'))).resolves.toHaveLength(1);
  }, 60_000);

  it('rejects what it still holds when closed', async () => {
    pool = await startRescorePool(fixture, 1);
    await answer(pool!, 'a');
    const hanging = pool!.run(slice('hang'));
    hanging.catch(() => {});
    await pool!.close();
    await expect(hanging).rejects.toThrow();
    await expect(pool!.run(slice('z'))).rejects.toThrow('closed');
    pool = null;
  }, 60_000);
});
