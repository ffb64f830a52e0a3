/**
 * Staff actions on an assessment's report page: send (or resend) for signature, and start a
 * revision of a signed one. Talks to the server only through /api.
 */
import { useState } from 'react';

interface Props {
  assessmentId: string;
  canSend: boolean;
  resend: boolean;
  canRevise: boolean;
  recipient: string | null;
}

export default function ReportActions({ assessmentId, canSend, resend, canRevise, recipient }: Props) {
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const [days, setDays] = useState(14);

  async function post(path: string, body: unknown): Promise<Response | null> {
    setBusy(true);
    setMessage(null);
    try {
      return await fetch(path, { method: 'POST', headers: { 'content-type': 'application/json', accept: 'application/json' }, body: JSON.stringify(body) });
    } catch {
      setMessage('The server could not be reached. Try again.');
      return null;
    } finally {
      setBusy(false);
    }
  }

  async function send() {
    const res = await post(`/api/assessments/${assessmentId}/send-for-signature`, { expiresInDays: days });
    if (!res) return;
    if (res.ok) return window.location.reload();
    const problem = await res.json().catch(() => ({}));
    setMessage(problem.detail ?? `Sending failed (${res.status}).`);
  }

  async function revise() {
    const res = await post(`/api/assessments/${assessmentId}/revise`, {});
    if (!res) return;
    if (res.ok) {
      const created = await res.json();
      return window.location.assign(`/assessments/${created.id}/walk`);
    }
    const problem = await res.json().catch(() => ({}));
    setMessage(problem.detail ?? `Starting a revision failed (${res.status}).`);
  }

  return (
    <div className="space-y-3">
      {canSend ? (
        <div className="flex flex-wrap items-end gap-3">
          <label className="block">
            <span className="label">Link valid for</span>
            <select className="field" value={days} onChange={(e) => setDays(Number(e.target.value))}>
              {[3, 7, 14, 30].map((d) => (
                <option key={d} value={d}>
                  {d} days
                </option>
              ))}
            </select>
          </label>
          <button type="button" className="btn" onClick={send} disabled={busy || !recipient}>
            {resend ? 'Send a new link' : 'Send for signature'}
          </button>
          <span className="text-sm text-iron-700">{recipient ? `To ${recipient}` : 'The client has no e-mail address yet.'}</span>
        </div>
      ) : null}
      {canRevise ? (
        <button type="button" className="btn-secondary" onClick={revise} disabled={busy}>
          Correct it: start a revision
        </button>
      ) : null}
      {message ? (
        <p role="alert" className="text-withdraw">
          {message}
        </p>
      ) : null}
    </div>
  );
}
