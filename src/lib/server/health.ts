/**
 * The mail server's reachability for /api/health, checked in the background.
 *
 * A check opens an SMTP session (connect, greeting, EHLO, log-in when SMTP_URL carries
 * credentials, QUIT), so it must never run per request: a burst of health calls would leave a
 * socket per call behind. One timer per process, started by the first health call and unref'd
 * so it never holds the process open, checks at most every HEALTH_CHECK_INTERVAL_MS (default
 * 5 s); health answers the last result with its age. Only the very first call, before any
 * result exists, waits for the check it starts (callers at that moment share that one check).
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { defaultSmtpUrl } from './mail/transport';

export const defaultCheckIntervalMs = 5000;
const checkTimeoutMs = 2000;

export interface MailHealth {
  ok: boolean;
  /** When the answer was found (ISO). */
  checkedAt: string;
  /** How old the answer is, in milliseconds. */
  ageMs: number;
}

interface CheckResult {
  ok: boolean;
  at: number;
}

let checker: Transporter | undefined;
let last: CheckResult | undefined;
let inFlight: Promise<CheckResult> | undefined;
let timer: NodeJS.Timeout | undefined;

function checkIntervalMs(): number {
  const configured = Number(process.env.HEALTH_CHECK_INTERVAL_MS);
  return Number.isFinite(configured) && configured >= 250 ? configured : defaultCheckIntervalMs;
}

/** A transport of its own, with short timeouts, so a silent server cannot pile up sockets. */
function checkTransport(): Transporter {
  checker ??= nodemailer.createTransport({
    url: process.env.SMTP_URL ?? defaultSmtpUrl,
    connectionTimeout: checkTimeoutMs,
    greetingTimeout: checkTimeoutMs,
    socketTimeout: checkTimeoutMs,
  });
  return checker;
}

function checkMail(): Promise<CheckResult> {
  inFlight ??= checkTransport()
    .verify()
    .then(
      () => true,
      () => false,
    )
    .then((ok) => {
      last = { ok, at: Date.now() };
      return last;
    })
    .finally(() => {
      inFlight = undefined;
    });
  return inFlight;
}

function scheduleNext(): void {
  timer = setTimeout(() => {
    void checkMail().finally(scheduleNext);
  }, checkIntervalMs());
  timer.unref();
}

/** The last known mail reachability; starts the background check on first use. */
export async function mailHealth(): Promise<MailHealth> {
  if (!timer) {
    const first = checkMail();
    scheduleNext();
    if (!last) await first;
  }
  const result = last ?? (await checkMail());
  return {
    ok: result.ok,
    checkedAt: new Date(result.at).toISOString(),
    ageMs: Math.max(0, Date.now() - result.at),
  };
}
