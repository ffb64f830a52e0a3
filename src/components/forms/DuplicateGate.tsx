/** Copies a gate's profile to a new gate on the same site (for sites with several gates alike) and shows it. */
import { useState } from 'react';
import { duplicateGate } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';

interface Props {
  gateId: string;
  siteId: string;
  label: string;
}

export default function DuplicateGate({ gateId, siteId, label }: Props) {
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const duplicate = async () => {
    setBusy(true);
    setMessage(null);
    const answer = await duplicateGate(gateId);
    if (answer.ok) {
      const id = answer.value.id;
      window.location.assign(
        `/gates/${id}?next=${encodeURIComponent(`/sites/${siteId}?gate=${id}#gate-${id}`)}`,
      );
      return;
    }
    setMessage(
      answer.problem.status === 0 ? 'No connection: try again with signal.' : problemMessage(answer.problem),
    );
    setBusy(false);
  };
  return (
    <>
      <button
        type="button"
        className="btn-secondary"
        disabled={busy}
        aria-label={`Duplicate ${label}`}
        onClick={() => void duplicate()}
      >
        {busy ? 'Copying…' : 'Duplicate'}
      </button>
      {message && (
        <p role="alert" className="basis-full font-semibold text-withdraw">
          {message}
        </p>
      )}
    </>
  );
}
