/**
 * Two devices saving the same draft from the same row version: exactly one save wins, the
 * other gets 409 with the current state, and what is stored is the winner's — never a blend,
 * never a silent overwrite.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { seedDirectory, type Directory } from './support/domain';

let org: FixtureOrganisation;
let dir: Directory;
/** The same auditor signed in on two devices. */
let tablet: TestClient;
let phone: TestClient;

beforeAll(async () => {
  org = await createOrganisation('concurrency');
  dir = await seedDirectory(org);
  [tablet, phone] = await Promise.all([
    signIn(org.auditor.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
  ]);
});

async function newDraft(): Promise<string> {
  const res = await tablet.json('POST', '/api/assessments', {
    gateId: dir.gateId,
    family: 'north-american-gate',
    purpose: 'service',
  });
  expect(res.status).toBe(201);
  return (await res.json()).id;
}

function save(device: TestClient, id: string, version: number, body: unknown): Promise<Response> {
  return device.fetch(`/api/assessments/${id}`, {
    method: 'PATCH',
    headers: { 'content-type': 'application/json', 'if-match': `"${version}"`, accept: 'application/json' },
    body: JSON.stringify(body),
  });
}

describe('saving a draft from two devices', () => {
  it('lets exactly one of two saves from the same version win; the other gets 409 with the current state', async () => {
    for (let round = 0; round < 10; round++) {
      const id = await newDraft();
      const fromTablet = { answers: { latchFitted: { value: 'yes', note: `tablet ${round}` } } };
      const fromPhone = { answers: { latchFitted: { value: 'no', note: `phone ${round}` } } };
      const responses = await Promise.all([save(tablet, id, 1, fromTablet), save(phone, id, 1, fromPhone)]);
      const statuses = responses.map((r) => r.status).sort();
      expect(statuses, `round ${round}`).toEqual([200, 409]);

      const winnerIndex = responses.findIndex((r) => r.status === 200);
      const winner = [fromTablet, fromPhone][winnerIndex] as typeof fromTablet;
      const won = await (responses[winnerIndex] as Response).json();
      const conflict = await (responses[1 - winnerIndex] as Response).json();
      expect(won.rowVersion).toBe(2);
      expect(conflict.status).toBe(409);
      expect(conflict.current).toMatchObject({ id, rowVersion: 2, answers: winner.answers });

      const stored = await testDb()('assessments').where({ id }).first('answers', 'row_version');
      expect(stored.row_version).toBe(2);
      expect(stored.answers).toEqual(winner.answers);
    }
  });

  it('lets one of many simultaneous saves win, and the loser can retry over the version it was shown', async () => {
    const id = await newDraft();
    const devices = Array.from({ length: 8 }, (_, i) => (i % 2 ? phone : tablet));
    const responses = await Promise.all(
      devices.map((d, i) =>
        save(d, id, 1, { answers: { ownerShown: { value: 'yes', note: `device ${i}` } } }),
      ),
    );
    expect(responses.filter((r) => r.status === 200)).toHaveLength(1);
    expect(responses.filter((r) => r.status === 409)).toHaveLength(7);

    const loser = responses.find((r) => r.status === 409) as Response;
    const { current } = await loser.json();
    const retry = await save(phone, id, current.rowVersion, { answers: { manualLeft: { value: 'yes' } } });
    expect(retry.status).toBe(200);
    const merged = await retry.json();
    expect(merged.rowVersion).toBe(3);
    expect(Object.keys(merged.answers).sort()).toEqual(['manualLeft', 'ownerShown']);
  });

  it('lets a submit and a save from the same version race without losing either silently', async () => {
    const id = await newDraft();
    const ready = await save(tablet, id, 1, {
      observations: {
        site: {
          pedestriansUseDriveway: false,
          childrenOrPetsPresent: false,
          publicAccess: false,
          slopeAcrossSwing: false,
        },
      },
    });
    expect(ready.status).toBe(200);
    const [submitted, saved] = await Promise.all([
      tablet.fetch(`/api/assessments/${id}/submit`, {
        method: 'POST',
        headers: { 'if-match': '"2"', accept: 'application/json' },
      }),
      save(phone, id, 2, { answers: { latchFitted: { value: 'no' } } }),
    ]);
    expect([submitted.status, saved.status].sort()).toEqual([200, 409]);
    const stored = await testDb()('assessments').where({ id }).first('status', 'answers', 'row_version');
    if (submitted.status === 200) {
      // Scored without the late answer: the save was refused, not merged in behind the result.
      expect(stored).toMatchObject({ status: 'scored', answers: {}, row_version: 3 });
    } else {
      expect(stored).toMatchObject({
        status: 'draft',
        answers: { latchFitted: { value: 'no' } },
        row_version: 3,
      });
    }
  });
});
