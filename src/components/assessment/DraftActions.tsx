/**
 * A draft's actions on its page: continue the walk-through, or discard a draft started by
 * mistake (after a confirmation that says what goes). Talks to the server only through /api.
 */
import { useState } from 'react';
import { discardDraft } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';
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
    const answer = await discardDraft(assessmentId);
    setBusy(false);
    setAsking(false);
    // Gone already (another device discarded it) is as good as discarded here.
    if (answer.ok || answer.problem.status === 404) return window.location.assign('/assessments?discarded=1');
    setMessage(
      problemMessage(
        answer.problem,
        `The draft could not be discarded (the server answered ${answer.problem.status}).`,
      ),
    );
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
