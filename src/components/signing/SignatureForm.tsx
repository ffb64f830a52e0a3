/**
 * The owner's signing form on the public /sign/[token] page: a checkbox per caution, consent to
 * sign electronically, the typed name, and a signature drawn with signature_pad.
 *
 * Keyboard and assistive-technology users (or anyone whose device cannot draw) tick "use my
 * typed name as my signature": the typed name then is the signature mark, recorded as
 * `typed`. Talks to the server only through POST /api/sign/{token}/submit.
 */
import { useEffect, useRef, useState, type FormEvent } from 'react';
import SignaturePad from 'signature_pad';
import { submitSignature } from '@/lib/api/client';

export interface CautionItem {
  ruleId: string;
  title: string;
  caution: string;
}

interface Props {
  token: string;
  cautions: CautionItem[];
  consentText: string;
  intentText: string;
  documentSha256: string;
  recipientEmail: string;
}

interface FormIssue {
  /** The id of the field that fixes it, for a link from the summary. */
  target: string | null;
  text: string;
}

type Phase =
  | { kind: 'editing' }
  | { kind: 'sending' }
  | { kind: 'signed'; documentSha256: string }
  | { kind: 'closed'; message: string };

export default function SignatureForm({
  token,
  cautions,
  consentText,
  intentText,
  documentSha256,
  recipientEmail,
}: Props) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const pad = useRef<SignaturePad | null>(null);
  const [ticked, setTicked] = useState<Record<string, boolean>>({});
  const [consent, setConsent] = useState(false);
  const [name, setName] = useState('');
  const [typedOnly, setTypedOnly] = useState(false);
  const [drawn, setDrawn] = useState(false);
  /** Set by the first press of Sign: from then on the summary follows the form as it is fixed. */
  const [attempted, setAttempted] = useState(false);
  /** What the server (or the network) said about the last attempt; cleared by the next change. */
  const [serverErrors, setServerErrors] = useState<string[]>([]);
  const [phase, setPhase] = useState<Phase>({ kind: 'editing' });

  useEffect(() => {
    const el = canvas.current;
    if (!el || typedOnly) return;
    setDrawn(false);
    const instance = new SignaturePad(el, {
      penColor: '#121c29',
      backgroundColor: 'rgba(255,255,255,0)',
      minWidth: 0.8,
      maxWidth: 2.6,
    });
    const fit = () => {
      // Size the bitmap to the element and the screen's pixel ratio so strokes stay sharp.
      const ratio = Math.max(window.devicePixelRatio || 1, 1);
      const data = instance.toData();
      el.width = el.offsetWidth * ratio;
      el.height = el.offsetHeight * ratio;
      el.getContext('2d')?.scale(ratio, ratio);
      instance.clear();
      instance.fromData(data);
    };
    fit();
    instance.addEventListener('endStroke', () => setDrawn(!instance.isEmpty()));
    window.addEventListener('resize', fit);
    pad.current = instance;
    return () => {
      window.removeEventListener('resize', fit);
      instance.off();
      pad.current = null;
    };
  }, [typedOnly]);

  /** What still stands between the person and signing, each with the field that fixes it. */
  const localProblems = (): FormIssue[] => {
    const problems: FormIssue[] = [];
    const unticked = cautions.filter((c) => !ticked[c.ruleId]);
    if (unticked.length)
      problems.push({
        target: 'sign-cautions',
        text: `Tick each caution to show you have read it (${unticked.length} left).`,
      });
    if (!consent)
      problems.push({ target: 'sign-consent', text: 'Tick the box to agree to sign electronically.' });
    if (name.trim().length < 2) problems.push({ target: 'signer-name', text: 'Type your full name.' });
    if (!typedOnly && !drawn)
      problems.push({
        target: 'sign-pad',
        text: 'Draw your signature in the box, or tick “use my typed name as my signature”.',
      });
    return problems;
  };
  const errors: FormIssue[] = [
    ...(attempted ? localProblems() : []),
    ...serverErrors.map((text) => ({ target: null, text })),
  ];

  // A change to the form makes the server's last answer out of date.
  useEffect(() => setServerErrors([]), [ticked, consent, name, typedOnly, drawn]);

  const clear = () => {
    pad.current?.clear();
    setDrawn(false);
  };

  async function submit(event: FormEvent) {
    event.preventDefault();
    setAttempted(true);
    setServerErrors([]);
    if (localProblems().length) return;
    setPhase({ kind: 'sending' });
    const signature =
      typedOnly || !pad.current
        ? { method: 'typed' as const }
        : { method: 'drawn' as const, png: pad.current.toDataURL('image/png') };
    const answer = await submitSignature<{ document?: { sha256?: string } }>(token, {
      name: name.trim(),
      consent: true,
      intent: true,
      acknowledgedCautions: cautions.map((c) => c.ruleId),
      shownPdfSha256: documentSha256,
      signature,
    });
    if (answer.ok) return setPhase({ kind: 'signed', documentSha256: answer.value?.document?.sha256 ?? '' });
    const { problem } = answer;
    if (problem.status === 0) {
      setServerErrors([
        'We could not reach the server. Check your connection and press Sign again; nothing was signed yet.',
      ]);
    } else if (problem.linkState) {
      return setPhase({ kind: 'closed', message: problem.detail ?? 'This link can no longer be used.' });
    } else {
      setServerErrors([
        problem.detail ?? 'Something went wrong; try again.',
        ...problem.errors.map((e) => e.message),
      ]);
    }
    setPhase({ kind: 'editing' });
  }

  if (phase.kind === 'signed') {
    return (
      <section className="card border-clear" role="status" aria-live="polite">
        <h2 className="text-xl font-bold text-clear">Signed. Thank you.</h2>
        <p className="mt-2">
          Your signed copy is on its way to <strong>{recipientEmail}</strong>. You can close this page.
        </p>
        {phase.documentSha256 ? (
          <p className="mt-2 break-all text-xs text-iron-600">
            Document fingerprint (SHA-256): {phase.documentSha256}
          </p>
        ) : null}
      </section>
    );
  }
  if (phase.kind === 'closed') {
    return (
      <section className="card" role="alert">
        <h2 className="text-xl font-bold">This link cannot be used now</h2>
        <p className="mt-2">{phase.message}</p>
      </section>
    );
  }

  return (
    <form
      onSubmit={submit}
      noValidate
      className="space-y-5"
      aria-describedby={errors.length ? 'sign-errors' : undefined}
    >
      {cautions.length ? (
        <fieldset id="sign-cautions" className="card space-y-3">
          <legend className="px-1 text-lg font-bold">Cautions to acknowledge</legend>
          <p className="text-sm text-iron-700">Until the fixes are done, please read each one and tick it.</p>
          {cautions.map((c) => (
            <label
              key={c.ruleId}
              className="flex min-h-11 cursor-pointer items-start gap-3 rounded-lg bg-brass-100 p-3"
            >
              <input
                type="checkbox"
                className="mt-1 size-5 shrink-0 accent-iron-800"
                checked={Boolean(ticked[c.ruleId])}
                onChange={(e) => setTicked({ ...ticked, [c.ruleId]: e.target.checked })}
              />
              <span>
                <span className="block font-semibold">{c.title}</span>
                <span className="block">{c.caution}</span>
              </span>
            </label>
          ))}
        </fieldset>
      ) : null}

      <fieldset className="card space-y-4">
        <legend className="px-1 text-lg font-bold">Your signature</legend>
        <label className="flex min-h-11 cursor-pointer items-start gap-3">
          <input
            id="sign-consent"
            type="checkbox"
            className="mt-1 size-5 shrink-0 accent-iron-800"
            checked={consent}
            onChange={(e) => setConsent(e.target.checked)}
          />
          <span>{consentText}</span>
        </label>
        <div>
          <label htmlFor="signer-name" className="label">
            Your full name
          </label>
          <input
            id="signer-name"
            className="field"
            autoComplete="name"
            value={name}
            onChange={(e) => setName(e.target.value)}
            maxLength={120}
            required
          />
        </div>
        {!typedOnly ? (
          <div>
            <span id="pad-label" className="label">
              Sign here with your finger or mouse
            </span>
            <canvas
              ref={canvas}
              id="sign-pad"
              tabIndex={-1}
              aria-labelledby="pad-label"
              role="img"
              className="block h-40 w-full touch-none rounded-lg border-2 border-dashed border-iron-400 bg-white"
            />
            <div className="mt-2 flex items-center justify-between gap-2 text-sm">
              <span className="text-iron-600">{drawn ? 'Signature drawn.' : 'Nothing drawn yet.'}</span>
              <button type="button" className="btn-secondary" onClick={clear}>
                Clear
              </button>
            </div>
          </div>
        ) : null}
        <label className="flex min-h-11 cursor-pointer items-start gap-3">
          <input
            type="checkbox"
            className="mt-1 size-5 shrink-0 accent-iron-800"
            checked={typedOnly}
            onChange={(e) => setTypedOnly(e.target.checked)}
          />
          <span>I cannot draw here: use my typed name as my signature.</span>
        </label>
      </fieldset>

      {errors.length ? (
        <div
          id="sign-errors"
          role="alert"
          className="rounded-lg border border-withdraw bg-white p-3 text-withdraw"
        >
          <ul className="list-disc pl-5">
            {errors.map((e) => (
              <li key={e.text}>
                {e.target ? (
                  <a className="inline-flex min-h-11 items-center text-withdraw" href={`#${e.target}`}>
                    {e.text}
                  </a>
                ) : (
                  e.text
                )}
              </li>
            ))}
          </ul>
        </div>
      ) : null}

      <div className="card space-y-3">
        <p>{intentText}</p>
        <button type="submit" className="btn w-full text-lg" disabled={phase.kind === 'sending'}>
          {phase.kind === 'sending' ? 'Signing…' : 'Sign the report'}
        </button>
      </div>
    </form>
  );
}
