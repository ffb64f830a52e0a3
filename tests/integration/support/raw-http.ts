/**
 * HTTP over node:http for what fetch cannot do: send from a chosen loopback address (so the
 * server sees a socket address of the test's own), stream a chunked body of any size without a
 * Content-Length, stopping as soon as the server answers, forge Host, and send a path exactly
 * as given.
 */
import http from 'node:http';

export interface RawResponse {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: Buffer;
  /** Body bytes written before the answer came (or all of them). */
  sentBytes: number;
  text(): string;
  json(): any; // eslint-disable-line @typescript-eslint/no-explicit-any
}

export interface RawRequest {
  method?: string;
  headers?: Record<string, string>;
  /** A body sent whole (with its Content-Length). */
  body?: string | Buffer;
  /** Or: this many bytes (`fill` repeated) sent chunked, 64 KiB at a time, with no Content-Length. */
  streamBytes?: number;
  /** Bytes sent before the streamed filler, e.g. the start of a multipart body. */
  streamPrefix?: Buffer;
  fill?: number;
  /** The local (source) address to connect from, e.g. 127.31.4.9. */
  localAddress?: string;
  /** The request target exactly as sent, instead of the URL's (URL normalises `..` and escapes). */
  rawPath?: string;
}

/** A random loopback address other than 127.0.0.1, as the socket address of one test's client. */
export function loopbackAddress(): string {
  const byte = () => 1 + Math.floor(Math.random() * 254);
  return `127.${byte()}.${byte()}.${byte()}`;
}

export function rawRequest(url: string | URL, options: RawRequest = {}): Promise<RawResponse> {
  const target = new URL(url);
  const headers: Record<string, string> = { ...options.headers };
  if (options.body !== undefined) headers['content-length'] = String(Buffer.byteLength(options.body));
  else if (
    options.streamBytes !== undefined &&
    !Object.keys(headers).some((h) => h.toLowerCase() === 'content-length')
  )
    headers['transfer-encoding'] = 'chunked';
  // A keep-alive connection of its own: with `Connection: close` (what `agent: false` sends) the
  // server closes right after answering, and a client still sending may see the reset first.
  const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
  return new Promise<RawResponse>((resolve, reject) => {
    let sentBytes = 0;
    let answered = false;
    const request = http.request(
      {
        host: target.hostname,
        port: target.port,
        path: options.rawPath ?? `${target.pathname}${target.search}`,
        method: options.method ?? 'GET',
        headers,
        localAddress: options.localAddress,
        agent,
      },
      (response) => {
        answered = true;
        const chunks: Buffer[] = [];
        response.on('data', (chunk: Buffer) => chunks.push(chunk));
        response.on('error', reject);
        response.on('end', () => {
          const body = Buffer.concat(chunks);
          request.destroy();
          resolve({
            status: response.statusCode ?? 0,
            headers: response.headers,
            body,
            sentBytes,
            text: () => body.toString('utf8'),
            json: () => JSON.parse(body.toString('utf8')),
          });
        });
      },
    );
    // Once the server has answered, a reset while we were still sending is expected.
    request.on('error', (error) => (answered ? undefined : reject(error)));
    if (options.body !== undefined) {
      sentBytes = Buffer.byteLength(options.body);
      request.end(options.body);
      return;
    }
    if (options.streamBytes === undefined) {
      request.end();
      return;
    }
    const total = options.streamBytes;
    const chunk = Buffer.alloc(64 * 1024, options.fill ?? 0x61);
    if (options.streamPrefix) {
      request.write(options.streamPrefix);
      sentBytes += options.streamPrefix.byteLength;
    }
    const pump = () => {
      while (!answered && !request.destroyed && sentBytes < total) {
        const part = chunk.subarray(0, Math.min(chunk.byteLength, total - sentBytes));
        sentBytes += part.byteLength;
        if (!request.write(part)) return void request.once('drain', pump);
      }
      if (!answered && !request.destroyed) request.end();
    };
    pump();
  }).finally(() => agent.destroy());
}

/** Cookie pairs from Set-Cookie headers, for sending back. */
export function cookiesOf(response: RawResponse): string[] {
  const lines = response.headers['set-cookie'] ?? [];
  return lines.map((line) => line.split(';')[0]);
}
