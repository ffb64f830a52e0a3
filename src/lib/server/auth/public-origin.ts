/**
 * The app's one public origin: AUTH_URL (or PUBLIC_URL), else the address this server listens
 * on (HOST, PORT). E-mailed links point there, the same-site check compares a write's Origin
 * with it, and auth core sees it as the request's URL (Secure cookies when it is https).
 * Nothing a request says (Host, X-Forwarded-Host, X-Forwarded-Proto) changes it, so a forged
 * header can neither put a stranger's host into a sign-in e-mail nor make another site's post
 * look like our own.
 */

export function configuredOrigin(): string | null {
  // An empty value counts as unset.
  const configured = process.env.AUTH_URL || process.env.PUBLIC_URL;
  if (!configured) return null;
  try {
    return new URL(configured).origin;
  } catch {
    return null;
  }
}

/** Whether the built server answers HTTPS itself (both SERVER_CERT_PATH and SERVER_KEY_PATH set). */
export function servesTls(): boolean {
  return Boolean(process.env.SERVER_CERT_PATH && process.env.SERVER_KEY_PATH);
}

/**
 * `http://host:port` (`https://` when the server answers TLS itself) for a listening address; a
 * wildcard address is reached on loopback.
 */
export function listeningOrigin(host: string, port: number | string, tls = servesTls()): string {
  const name = host === '' || host === '0.0.0.0' || host === '::' || host === '[::]' ? '127.0.0.1' : host;
  const bracketed = name.includes(':') && !name.startsWith('[') ? `[${name}]` : name;
  return new URL(`${tls ? 'https' : 'http'}://${bracketed}:${port}`).origin;
}

/**
 * The public origin: of every link in an e-mail (sign-in, invitation, signing, reminders), of the
 * pages whose forms may post, of auth core's URLs. `npm start`, `npm run dev` and the test servers
 * set PUBLIC_URL; production sets AUTH_URL or PUBLIC_URL to the address people use.
 */
export function linkOrigin(): string {
  return configuredOrigin() ?? listeningOrigin(process.env.HOST ?? '127.0.0.1', process.env.PORT ?? 4321);
}
