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
  /** The client's contact e-mail: who gets the link unless the office picks another. */
  recipient: string | null;
  /** Addresses to pick from: the client's contact e-mail and its sign-in accounts. */
  contacts?: string[];
}

const OTHER = '__other__';

export default function ReportActions({
  assessmentId,
  canSend,
  resend,
  canRevise,
  recipient,
  contacts = [],
}: Props) {
  const choices = contacts.length ? contacts : recipient ? [recipient] : [];
  const [choice, setChoice] = useState(choices[0] ?? OTHER);
  const [typed, setTyped] = useState('');
  const [fieldError, setFieldError] = useState<string | null>(null);
  const to = choice === OTHER ? typed.trim() : choice;
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<string | null>(null);
  const [days, setDays] = useState(14);

  async function post(path: string, body: unknown): Promise<Response | null> {
    setBusy(true);
    setMessage(null);
    try {
      return await fetch(path, {
        method: 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify(body),
      });
    } catch {
      setMessage('The server could not be reached. Try again.');
      return null;
    } finally {
      setBusy(false);
    }
  }

  async function send() {
    setFieldError(null);
    const res = await post(`/api/assessments/${assessmentId}/send-for-signature`, {
      expiresInDays: days,
      recipient: to,
    });
    if (!res) return;
    if (res.ok) return window.location.reload();
    const problem = await res.json().catch(() => ({}));
    const recipientError = (problem.errors as { field: string; message: string }[] | undefined)?.find(
      (e) => e.field === 'recipient',
    );
    if (recipientError) setFieldError(`The address ${recipientError.message}.`);
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
            <span className="label">Send the link to</span>
            <select className="field" value={choice} onChange={(e) => setChoice(e.target.value)}>
              {choices.map((c) => (
                <option key={c} value={c}>
                  {c}
                </option>
              ))}
              <option value={OTHER}>Another address…</option>
            </select>
          </label>
          {choice === OTHER ? (
            <label className="block">
              <span className="label">E-mail address</span>
              <input
                className="field"
                type="email"
                autoComplete="off"
                value={typed}
                onChange={(e) => setTyped(e.target.value)}
                aria-invalid={fieldError ? true : undefined}
                aria-describedby={fieldError ? 'recipient-error' : undefined}
              />
              {fieldError ? (
                <span id="recipient-error" className="block text-sm text-withdraw">
                  {fieldError}
                </span>
              ) : null}
            </label>
          ) : null}
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
          <button type="button" className="btn" onClick={send} disabled={busy || !to}>
            {resend ? 'Send a new link' : 'Send for signature'}
          </button>
          <span className="text-sm text-iron-700">
            {to ? `The link goes only to ${to}.` : 'Choose who receives the link.'}
          </span>
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
