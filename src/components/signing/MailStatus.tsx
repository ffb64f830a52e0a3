/**
 * The e-mails about an assessment with their delivery state. A message not yet tried shows as
 * "Sending…" and the island asks the server again for a short while, so a mail delivered a
 * moment later shows as sent without a reload; only a message the mail server refused (a
 * failed try) is described as waiting for it.
 */
import { useEffect, useState } from 'react';
import { signingStatus } from '@/lib/api/client';
import { formatDayTime, MAIL_KIND_LABEL, count } from '@/lib/vocabulary';

export interface MailMessage {
  id: string;
  kind: string;
  to: string[];
  status: 'queued' | 'sending' | 'sent' | 'failed';
  attempts: number;
  nextAttemptAt: string | null;
  lastError: string | null;
  sentAt: string | null;
}

interface Props {
  assessmentId: string;
  initial: MailMessage[];
  timeZone: string;
  /** How long to keep asking while a message is on its way, ms. */
  pollForMs?: number;
}

const pending = (m: MailMessage) => m.status === 'queued' || m.status === 'sending';

export default function MailStatus({ assessmentId, initial, timeZone, pollForMs = 20_000 }: Props) {
  const [messages, setMessages] = useState(initial);
  const [gaveUp, setGaveUp] = useState(false);
  const waiting = messages.some(pending);

  useEffect(() => {
    if (!waiting) return;
    const started = Date.now();
    let stopped = false;
    let timer: ReturnType<typeof setTimeout>;
    const ask = async () => {
      // No answer this time (or a refusal): ask again below.
      const answer = await signingStatus<{ messages: MailMessage[] }>(assessmentId);
      if (answer.ok) {
        if (!stopped) setMessages(answer.value.messages);
        if (!answer.value.messages.some(pending)) return;
      }
      if (stopped) return;
      if (Date.now() - started > pollForMs) setGaveUp(true);
      else timer = setTimeout(ask, Date.now() - started < 3000 ? 300 : 1500);
    };
    timer = setTimeout(ask, 300);
    return () => {
      stopped = true;
      clearTimeout(timer);
    };
  }, [assessmentId, waiting, pollForMs]);

  if (messages.length === 0)
    return <p className="mt-1 text-iron-800">No e-mail about this assessment yet.</p>;
  const refused = messages.some((m) => pending(m) && m.attempts > 0);
  return (
    <div aria-live="polite">
      {refused && (
        <p className="mt-1 text-sm text-iron-700">
          Messages wait here while the mail server cannot be reached; they go out by themselves when it
          answers.
          {gaveUp ? ' Reload to see the latest state.' : ''}
        </p>
      )}
      <ul className="mt-2 divide-y divide-iron-100">
        {messages.map((m) => (
          <li key={m.id} className="py-2" data-message-status={m.status}>
            <p className="font-semibold">
              {MAIL_KIND_LABEL[m.kind] ?? 'E-mail'}{' '}
              <span className="font-normal text-iron-700">to {m.to.join(', ')}</span>
            </p>
            <p className="text-sm">
              {m.status === 'sent' && (
                <span className="text-clear">Sent {formatDayTime(m.sentAt, timeZone)}</span>
              )}
              {pending(m) && m.attempts === 0 && (
                <span className="text-iron-800">
                  {gaveUp ? 'Not sent yet: reload to see the latest state' : 'Sending…'}
                </span>
              )}
              {pending(m) && m.attempts > 0 && (
                <span className="text-remedy">
                  Queued: waiting for the mail server (tried {count(m.attempts, 'time')}, next try{' '}
                  {formatDayTime(m.nextAttemptAt, timeZone)})
                </span>
              )}
              {m.status === 'failed' && (
                <span className="text-withdraw">
                  Not delivered after {count(m.attempts, 'try', 'tries')}. The mail server said:{' '}
                  {m.lastError ?? 'nothing'}
                </span>
              )}
            </p>
          </li>
        ))}
      </ul>
    </div>
  );
}
