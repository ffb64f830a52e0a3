/**
 * The production HTTP server around Astro's request handler (the node adapter in `middleware`
 * mode), started by `dist/server/serve.mjs` (src/server-entry.ts, bundled at build time by
 * src/integrations/server-entry.ts).
 *
 * It answers as the adapter's standalone server did, minus its cost: that server looked every
 * request's path up on disk (an `lstat` and a `stat`) before handing pages and the API to Astro.
 * Here the client folder (`dist/client`: built assets and `public/`) is listed once at start;
 * a request whose path names one of those files is served by `send` exactly as before (same
 * options, a year's immutable caching for `/_astro/`), and anything else goes straight to Astro.
 * Only files listed at start can be served, so no path (`..`, encoded or not) reaches outside
 * the folder; dotfiles are never listed (`/.well-known/` excepted, as before).
 *
 * Unchanged from the standalone server: a URL that does not decode is a bare 400; the client
 * address comes from the hook in src/lib/server/http/client-address-hook.ts (imported by the
 * adapter's entry, so subscribed before this server listens); HTTPS with SERVER_CERT_PATH and
 * SERVER_KEY_PATH; Node's default header and time limits. Request bodies are bounded by the
 * routes (body.ts).
 *
 * Not as before: the headers by which a caller names the host or scheme it used
 * (`X-Forwarded-Host`, `X-Forwarded-Proto`, `X-Forwarded-Port`, `Forwarded`) are dropped before
 * Astro builds the request, whoever sent them and whatever TRUST_PROXY says. Astro's
 * `createRequest` believed `X-Forwarded-Proto` from anyone, so `request.url` / `Astro.url` said
 * `https:` when a caller claimed it. Nothing in the app needs the request's origin: links,
 * the same-site check, auth core's URL and cookie flags all come from the configured public
 * origin (auth/public-origin.ts). `request.url` keeps only the path and query the caller sent,
 * on the connection's own scheme (host `localhost`: Astro believes no Host header either).
 */
import fs from 'node:fs';
import http, { type IncomingMessage, type ServerResponse } from 'node:http';
import https from 'node:https';
import path from 'node:path';
import send from 'send';

export type AstroHandler = (req: IncomingMessage, res: ServerResponse) => Promise<void> | void;

/** The folder the built assets are served from. */
const assetsPrefix = '/_astro/';

/**
 * Every file under `clientDir` by the URL path that names it (`/favicon.svg`, `/_astro/x.js`),
 * and each folder holding an `index.html` by its path with and without the slash.
 */
export function listClientFiles(clientDir: string): Map<string, string> {
  const files = new Map<string, string>();
  if (!fs.existsSync(clientDir)) return files;
  for (const entry of fs.readdirSync(clientDir, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const full = path.join(entry.parentPath ?? entry.path, entry.name);
    const urlPath = `/${path.relative(clientDir, full).split(path.sep).join('/')}`;
    // send refuses dotfiles (and files in dot folders) except under /.well-known/.
    const dotted = urlPath.split('/').some((part) => part.startsWith('.'));
    if (dotted && !urlPath.startsWith('/.well-known/')) continue;
    files.set(urlPath, urlPath);
    if (entry.name === 'index.html') {
      const folder = urlPath.slice(0, -'index.html'.length);
      files.set(folder, urlPath);
      if (folder.length > 1) files.set(folder.slice(0, -1), urlPath);
    }
  }
  return files;
}

/** A request URL's path: no fragment, no query, still encoded. */
function rawPathname(url: string): string {
  let pathname = url;
  const hash = pathname.indexOf('#');
  if (hash !== -1) pathname = pathname.slice(0, hash);
  const query = pathname.indexOf('?');
  return query === -1 ? pathname : pathname.slice(0, query);
}

/**
 * The client file a request URL names (its path under the client folder), or null. The path is
 * decoded and normalised as `send` does before the lookup.
 */
export function clientFileFor(url: string, files: Map<string, string>): string | null {
  let pathname: string;
  try {
    pathname = decodeURIComponent(rawPathname(url));
  } catch {
    return null;
  }
  if (pathname.includes('\0')) return null;
  return files.get(path.posix.normalize(`/${pathname}`)) ?? null;
}

/** What a caller may say about the host or scheme it used; never believed (see above). */
export const forwardedOriginHeaders = [
  'x-forwarded-host',
  'x-forwarded-proto',
  'x-forwarded-port',
  'forwarded',
];

/** Drops the forwarded host/scheme headers from an incoming request, in place. */
export function dropForwardedOrigin(req: IncomingMessage): void {
  for (const name of forwardedOriginHeaders) delete req.headers[name];
}

/** The request listener: listed client files through `send`, everything else to Astro. */
export function createRequestListener(
  astro: AstroHandler,
  clientDir: string,
  files: Map<string, string> = listClientFiles(clientDir),
): http.RequestListener {
  const toAstro = (req: IncomingMessage, res: ServerResponse) => {
    Promise.resolve(astro(req, res)).catch((error: unknown) => {
      console.error(`Could not render ${req.url}`, error);
      if (!res.headersSent) {
        res.writeHead(500);
        res.end('Internal Server Error');
      } else res.destroy();
    });
  };
  return (req, res) => {
    dropForwardedOrigin(req);
    const url = req.url ?? '/';
    try {
      decodeURI(url);
    } catch {
      res.writeHead(400);
      res.end('Bad request.');
      return;
    }
    const file = clientFileFor(url, files);
    if (file === null) return toAstro(req, res);
    // What the standalone server gave send: the path as sent, a folder's index.html named.
    let pathname = rawPathname(url);
    if (file.endsWith('/index.html') && !pathname.endsWith('/') && !pathname.endsWith('/index.html'))
      pathname = `${pathname}/index.html`;
    const stream = send(req, pathname, {
      root: clientDir,
      dotfiles: pathname.startsWith('/.well-known/') ? 'allow' : 'deny',
    });
    let sending = false;
    stream.on('error', (error: Error) => {
      // Refused by send (e.g. a path that climbs out of the folder) or gone: Astro answers.
      if (!sending) return toAstro(req, res);
      console.error(String(error));
      res.writeHead(500);
      res.end('Internal server error');
    });
    stream.on('headers', (out: ServerResponse) => {
      if (pathname.startsWith(assetsPrefix))
        out.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
    });
    stream.on('file', () => {
      sending = true;
    });
    stream.pipe(res);
  };
}

/** An HTTP server (HTTPS with SERVER_CERT_PATH and SERVER_KEY_PATH) around the listener. */
export function createNodeServer(listener: http.RequestListener): http.Server {
  const cert = process.env.SERVER_CERT_PATH;
  const key = process.env.SERVER_KEY_PATH;
  if (cert && key)
    return https.createServer({ cert: fs.readFileSync(cert), key: fs.readFileSync(key) }, listener);
  return http.createServer(listener);
}
