/**
 * Staff actions on an assessment's report page: send (or resend) for signature, and start a
 * revision of a signed one. Talks to the server only through /api.
 */
import { useState } from 'react';
import { sendForSignature, startRevision } from '@/lib/api/client';
import { fieldProblem, problemMessage } from '@/lib/api/problem';

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

  async function send() {
    setFieldError(null);
    setBusy(true);
    setMessage(null);
    const answer = await sendForSignature(assessmentId, { expiresInDays: days, recipient: to });
    setBusy(false);
    if (answer.ok) return window.location.reload();
    const recipientError = fieldProblem(answer.problem, 'recipient');
    if (recipientError) setFieldError(`The address ${recipientError}.`);
    setMessage(problemMessage(answer.problem, `Sending failed (${answer.problem.status}).`));
  }

  async function revise() {
    setBusy(true);
    setMessage(null);
    const answer = await startRevision(assessmentId);
    setBusy(false);
    if (answer.ok) return window.location.assign(`/assessments/${answer.value.id}/walk`);
    setMessage(problemMessage(answer.problem, `Starting a revision failed (${answer.problem.status}).`));
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
