/** Starts a draft assessment of one gate, pinned to the chosen family's current version, and opens its walk-through. */
import { useId, useState } from 'react';
import { startAssessment } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';
import { createKey } from '@/lib/create-key';

interface Props {
  gateId: string;
  families: { family: string; title: string; current: string }[];
  /** The day of the gate's last signed visit, in words, when it has one: offers to start from its answers. */
  lastSignedOn?: string | null;
}

const PURPOSES = [
  { value: 'inspection', label: 'Inspection' },
  { value: 'service', label: 'Service visit' },
  { value: 'handover', label: 'Handover of a new install' },
] as const;

export default function StartAssessment({ gateId, families, lastSignedOn }: Props) {
  const [carryForward, setCarryForward] = useState(false);
  const [family, setFamily] = useState(families[0]?.family ?? '');
  const [purpose, setPurpose] = useState<string>('inspection');
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const id = useId();
  if (families.length === 0) return <p className="text-remedy">No ruleset is published yet.</p>;
  const start = async () => {
    setBusy(true);
    setMessage(null);
    const body = { gateId, family, purpose, ...(carryForward ? { carryForward } : {}) };
    // A retry after a lost answer (or a double tap) reuses the key, so it never starts two drafts.
    const create = createKey('/api/assessments', JSON.stringify(body));
    const answer = await startAssessment(body, create.key);
    if (answer.ok) {
      create.done();
      window.location.assign(`/assessments/${answer.value.id}/walk`);
      return;
    }
    setMessage(
      answer.problem.status === 0
        ? 'No connection: starting an assessment needs signal once.'
        : problemMessage(answer.problem),
    );
    setBusy(false);
  };
  return (
    <div className="grid gap-2 sm:grid-cols-[1fr_1fr_auto] sm:items-end">
      <div>
        <label htmlFor={`${id}-family`} className="label">
          Ruleset
        </label>
        <select
          id={`${id}-family`}
          className="field"
          value={family}
          onChange={(e) => setFamily(e.target.value)}
        >
          {families.map((f) => (
            <option key={f.family} value={f.family}>
              {f.title} ({f.current})
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor={`${id}-purpose`} className="label">
          Purpose
        </label>
        <select
          id={`${id}-purpose`}
          className="field"
          value={purpose}
          onChange={(e) => setPurpose(e.target.value)}
        >
          {PURPOSES.map((p) => (
            <option key={p.value} value={p.value}>
              {p.label}
            </option>
          ))}
        </select>
      </div>
      {lastSignedOn ? (
        <label className="flex min-h-11 items-start gap-2 sm:col-span-3 sm:order-last">
          <input
            type="checkbox"
            className="mt-1 size-5 shrink-0"
            checked={carryForward}
            onChange={(e) => setCarryForward(e.target.checked)}
          />
          <span>
            Start from the answers of the signed visit on {lastSignedOn}
            <span className="block text-sm text-iron-600">
              Each carried answer is marked &ldquo;confirm&rdquo; until you confirm or change it at the gate.
            </span>
          </span>
        </label>
      ) : null}
      <button type="button" className="btn" disabled={busy} onClick={() => void start()}>
        {busy ? 'Starting…' : 'Start the walk-through'}
      </button>
      {message && (
        <p role="alert" className="font-semibold text-withdraw sm:col-span-3">
          {message}
        </p>
      )}
    </div>
  );
}
