import { describe, expect, it } from 'vitest';
import {
  applyMergePatch,
  composeMergePatches,
  jsonEqual,
  patchAt,
  valueAt,
  type JsonObject,
} from '@/lib/walk/merge-patch';

describe('folding queued edits (RFC 7396 merge patches)', () => {
  const server: JsonObject = {
    answers: { a: { value: 'no', note: 'rusty' }, b: { value: 'yes' } },
    observations: { site: { publicAccess: true } },
  };

  it('folds two edits into one with the same effect as sending both in order', () => {
    const first: JsonObject = { answers: { a: { value: 'yes' } } };
    const second: JsonObject = { answers: { b: null }, observations: { site: { slopeAcrossSwing: false } } };
    const folded = composeMergePatches(first, second);
    expect(folded).not.toBeNull();
    expect(applyMergePatch(server, folded as JsonObject)).toEqual(
      applyMergePatch(applyMergePatch(server, first), second),
    );
  });

  it('lets a later value of the same field win', () => {
    const folded = composeMergePatches(
      { answers: { a: { value: 'yes' } } },
      { answers: { a: { value: 'na' } } },
    );
    expect(applyMergePatch(server, folded as JsonObject)).toMatchObject({
      answers: { a: { value: 'na', note: 'rusty' } },
    });
  });

  it('refuses to fold an object written over a removal, which one patch cannot express', () => {
    expect(composeMergePatches({ answers: { a: null } }, { answers: { a: { value: 'yes' } } })).toBeNull();
    // Sent one after the other the note is gone; folded it would have survived.
    expect(
      applyMergePatch(applyMergePatch(server, { answers: { a: null } }), {
        answers: { a: { value: 'yes' } },
      }),
    ).toMatchObject({
      answers: { a: { value: 'yes' } },
    });
  });

  it('builds a patch for one path and reads a value at a path', () => {
    expect(patchAt(['observations', 'site', 'publicAccess'], false)).toEqual({
      observations: { site: { publicAccess: false } },
    });
    expect(valueAt(server, ['answers', 'a', 'note'])).toBe('rusty');
    expect(valueAt(server, ['answers', 'zz', 'note'])).toBeUndefined();
  });

  it('compares JSON values by content, not key order', () => {
    expect(jsonEqual({ a: 1, b: [1, { c: 2 }] }, { b: [1, { c: 2 }], a: 1 })).toBe(true);
    expect(jsonEqual({ a: 1 }, { a: 1, b: null })).toBe(false);
    expect(jsonEqual([1, 2], [2, 1])).toBe(false);
  });
});
