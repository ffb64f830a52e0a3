import type { WalkDraft } from '@/lib/api/walk-through';
import { describe, expect, it } from 'vitest';
import { applyDraftPatch, changedFields, findConflicts, withoutField } from '@/lib/walk/draft';

const base: WalkDraft = {
  answers: { hingeSideGuarded: { value: 'no', note: 'open hinge' }, latchFitted: { value: 'yes' } },
  measurements: { hingeGapMm: { value: 2, unit: 'in', canonical: 50.8, note: 'at the top' } },
  observations: { site: { publicAccess: false, slopeAcrossSwing: false } },
};

describe('applying an edit on the device the way the server does', () => {
  it('merges an answer (a note survives a new value) but replaces a measurement whole', () => {
    const next = applyDraftPatch(base, {
      answers: { hingeSideGuarded: { value: 'yes' } },
      measurements: { hingeGapMm: { value: 60, unit: 'mm', canonical: 60 } },
    });
    expect(next.answers.hingeSideGuarded).toEqual({ value: 'yes', note: 'open hinge' });
    expect(next.measurements.hingeGapMm).toEqual({ value: 60, unit: 'mm', canonical: 60 });
  });

  it('removes a field set to null and leaves untouched entries as they were (same objects)', () => {
    const next = applyDraftPatch(base, {
      answers: { latchFitted: null },
      measurements: { hingeGapMm: null },
    });
    expect(next.answers.latchFitted).toBeUndefined();
    expect(next.measurements).toEqual({});
    expect(next.observations).toBe(base.observations);
  });

  it('names each field an edit changes: answers, measurements, site facts, whole observation parts', () => {
    expect(
      changedFields({
        answers: { a: { value: 'yes' } },
        measurements: { m: null },
        observations: { site: { publicAccess: true }, forceTests: [] },
      }),
    ).toEqual([
      ['answers', 'a'],
      ['measurements', 'm'],
      ['observations', 'site', 'publicAccess'],
      ['observations', 'forceTests'],
    ]);
  });
});

describe('a newer server copy against edits waiting on the device', () => {
  it('finds no conflict when the other device changed other fields', () => {
    const theirs = applyDraftPatch(base, { answers: { latchFitted: { value: 'no' } } });
    expect(findConflicts(base, theirs, [{ answers: { hingeSideGuarded: { value: 'yes' } } }])).toEqual([]);
  });

  it('finds no conflict when both set the same value', () => {
    const theirs = applyDraftPatch(base, { observations: { site: { publicAccess: true } } });
    expect(findConflicts(base, theirs, [{ observations: { site: { publicAccess: true } } }])).toEqual([]);
  });

  it('reports a field both changed to different values, with the base, their value and ours', () => {
    const theirs = applyDraftPatch(base, { answers: { hingeSideGuarded: { value: 'na' } } });
    const conflicts = findConflicts(base, theirs, [
      { answers: { hingeSideGuarded: { value: 'yes' } } },
      { answers: { latchFitted: { value: 'no' } } },
    ]);
    expect(conflicts).toEqual([
      {
        field: ['answers', 'hingeSideGuarded'],
        base: { value: 'no', note: 'open hinge' },
        theirs: { value: 'na', note: 'open hinge' },
        mine: { value: 'yes', note: 'open hinge' },
      },
    ]);
  });

  it('drops one field from a waiting edit when the auditor keeps the server value, and empty parents with it', () => {
    expect(
      withoutField({ answers: { a: { value: 'yes' } }, observations: { site: { publicAccess: true } } }, [
        'observations',
        'site',
        'publicAccess',
      ]),
    ).toEqual({
      answers: { a: { value: 'yes' } },
    });
  });
});
