/**
 * Auth core configuration (auth-astro). Sessions are JWTs in an HttpOnly cookie holding only
 * the user id, their session_version and a session id (`sid`, revoked at sign-out); src/middleware.ts reloads the user row on every
 * request, so deactivation and role changes apply at once. Two ways in, both "credentials"
 * to auth core: staff e-mail + password, and a homeowner's one-time e-mailed link (requested
 * through POST /api/auth/email-link, redeemed here). Endpoints live in
 * src/pages/api/auth/[...auth].ts, which runs auth core with the caller's address at hand.
 */
import { randomUUID } from 'node:crypto';
import { CredentialsSignin } from '@auth/core/errors';
import Credentials from '@auth/core/providers/credentials';
import { defineConfig } from 'auth-astro';
import { currentSignInContext } from './src/lib/server/auth/request-context';
import { authSecret, sessionMaxAgeSeconds } from './src/lib/server/auth/settings';
import { signInWithLink, signInWithPassword, type SignInOutcome } from './src/lib/server/auth/sign-in';
import { recordSignOut } from './src/lib/server/auth/sign-out';
import { loadSession } from './src/lib/server/users';

declare module '@auth/core/jwt' {
  interface JWT {
    /** users.session_version when the session was issued. */
    sessionVersion?: number;
    /** This session's id, fixed at sign-in; signing out records it in revoked_sessions. */
    sid?: string;
  }
}

/** Too many attempts: the sign-in page says so, the API answers 429. */
class ThrottledSignIn extends CredentialsSignin {
  code = 'throttled';
}

/** A link that was used, expired, or never existed: the page offers to send a new one. */
class UnusableLink extends CredentialsSignin {
  code = 'link';
}

/** Turns our outcome into what auth core expects from `authorize`. */
function authorized(result: SignInOutcome, onInvalid?: () => never) {
  if (result.outcome === 'throttled') {
    currentSignInContext().retryAfterSeconds = result.retryAfterSeconds;
    throw new ThrottledSignIn();
  }
  if (result.outcome !== 'signed_in') return onInvalid ? onInvalid() : null;
  const { id, email, name, sessionVersion } = result.person;
  return { id, email, name, sessionVersion };
}

const text = (value: unknown, max: number) => (typeof value === 'string' && value.length <= max ? value : '');

export default defineConfig({
  prefix: '/api/auth',
  injectEndpoints: false,
  get secret() {
    return authSecret();
  },
  // The endpoint hands auth core the public URL itself (src/lib/server/auth/public-origin.ts).
  trustHost: true,
  session: { strategy: 'jwt', maxAge: sessionMaxAgeSeconds },
  pages: { signIn: '/signin', error: '/signin', signOut: '/signin' },
  providers: [
    Credentials({
      id: 'credentials',
      name: 'E-mail and password',
      credentials: {
        email: { label: 'E-mail', type: 'email' },
        password: { label: 'Password', type: 'password' },
      },
      async authorize(credentials) {
        const email = text(credentials.email, 254).trim();
        const password = text(credentials.password, 256);
        if (!email || !password) return null;
        const { ip, userAgent } = currentSignInContext();
        return authorized(await signInWithPassword({ email, password, ip, userAgent }));
      },
    }),
    Credentials({
      id: 'email-link',
      name: 'E-mailed sign-in link',
      credentials: { token: { label: 'Token', type: 'text' } },
      async authorize(credentials) {
        const { ip, userAgent } = currentSignInContext();
        return authorized(await signInWithLink(credentials.token, ip, userAgent), () => {
          throw new UnusableLink();
        });
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        const sessionVersion = (user as { sessionVersion?: unknown }).sessionVersion;
        return {
          sub: user.id,
          name: user.name,
          email: user.email,
          sessionVersion: typeof sessionVersion === 'number' ? sessionVersion : undefined,
          // Our own session id: auth core changes `jti` whenever it re-encodes the token, so it cannot name a session.
          sid: randomUUID(),
        };
      }
      return token;
    },
    /** GET /api/auth/session answers only while the session still holds, like every page. */
    async session({ session, token }) {
      const current =
        token.sub && typeof token.sessionVersion === 'number' && typeof token.sid === 'string'
          ? await loadSession(token.sub, token.sessionVersion, token.sid)
          : null;
      if (!current) return { expires: session.expires, user: undefined } as unknown as typeof session;
      return {
        ...session,
        user: { ...session.user, id: current.user.id, name: current.user.name, email: current.user.email },
      };
    },
  },
  events: {
    async signOut(message) {
      const token = 'token' in message ? message.token : null;
      if (!token?.sub) return;
      const session =
        typeof token.sid === 'string' && typeof token.exp === 'number'
          ? { id: token.sid, expiresAt: new Date(token.exp * 1000) }
          : null;
      await recordSignOut(token.sub, currentSignInContext().ip, session);
    },
  },
  logger: {
    error(error) {
      // A refused sign-in is an expected answer, already in the audit trail; not a server error.
      if (error instanceof CredentialsSignin || (error as { type?: string }).type === 'CredentialsSignin')
        return;
      console.error('[auth]', error);
    },
    warn(code) {
      console.warn('[auth]', code);
    },
  },
});
