/**
 * A draft's actions on its page: continue the walk-through, or discard a draft started by
 * mistake (after a confirmation that says what goes). Talks to the server only through /api.
 */
import { useState } from 'react';
import ConfirmDialog from '../ConfirmDialog';

interface Props {
  assessmentId: string;
  gateLabel: string;
  rowVersion: number;
}

export default function DraftActions({ assessmentId, gateLabel }: Props) {
  const [asking, setAsking] = useState(false);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);

  async function discard() {
    setBusy(true);
    setMessage(null);
    try {
      const res = await fetch(`/api/assessments/${assessmentId}`, {
        method: 'DELETE',
        headers: { accept: 'application/json' },
      });
      if (res.status === 204 || res.status === 404) return window.location.assign('/assessments?discarded=1');
      const problem = await res.json().catch(() => ({}));
      setMessage(problem.detail ?? `The draft could not be discarded (the server answered ${res.status}).`);
    } catch {
      setMessage('No connection to the server. Try again when you have signal.');
    } finally {
      setBusy(false);
      setAsking(false);
    }
  }

  return (
    <div className="mt-3 grid gap-3">
      <div className="flex flex-wrap gap-3">
        <a className="btn" href={`/assessments/${assessmentId}/walk`}>
          Continue the walk-through
        </a>
        <button type="button" className="btn-secondary" onClick={() => setAsking(true)}>
          Discard this draft
        </button>
      </div>
      {message && (
        <p role="alert" className="font-semibold text-withdraw">
          {message}
        </p>
      )}
      <ConfirmDialog
        open={asking}
        title="Discard this draft?"
        confirmLabel="Discard the draft"
        cancelLabel="Keep the draft"
        tone="danger"
        busy={busy}
        onConfirm={discard}
        onCancel={() => setAsking(false)}
      >
        <p>The answers and measurements for {gateLabel} in this draft are deleted. This cannot be undone.</p>
        <p>
          The gate, its site and earlier assessments stay as they are. The audit trail keeps a note that the
          draft was discarded.
        </p>
      </ConfirmDialog>
    </div>
  );
}
