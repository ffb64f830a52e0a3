/** Copies a gate's profile to a new gate on the same site (for sites with several gates alike) and shows it. */
import { useState } from 'react';

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
    try {
      const response = await fetch(`/api/gates/${gateId}/duplicate`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: '{}',
      });
      const body = await response.json().catch(() => null);
      if (!response.ok) throw new Error(body?.detail ?? `The server answered ${response.status}.`);
      const id = (body as { id: string }).id;
      window.location.assign(
        `/gates/${id}?next=${encodeURIComponent(`/sites/${siteId}?gate=${id}#gate-${id}`)}`,
      );
    } catch (error) {
      setMessage(
        error instanceof TypeError ? 'No connection: try again with signal.' : (error as Error).message,
      );
      setBusy(false);
    }
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
