/**
 * Makes Astro's `clientAddress` the trusted client address in the built server.
 *
 * Astro's node adapter takes the client address from the first X-Forwarded-For entry when
 * the header is present, whoever sent it. Node publishes every incoming request on the
 * `http.server.request.start` diagnostics channel, synchronously, before the server's request
 * handler (the adapter) sees it; here each request's X-Forwarded-For is replaced with the one
 * address `trustedClientAddress` derives from the socket and `TRUST_PROXY`, or removed when
 * there is none (the adapter then falls back to the socket address).
 *
 * Imported first by the server entry (src/integrations/client-address.ts puts the import
 * there at build time), so it is subscribed before the server listens. Importing it again
 * is harmless. An invalid TRUST_PROXY stops the server at start.
 */
import diagnosticsChannel from 'node:diagnostics_channel';
import type { IncomingMessage } from 'node:http';
import type { Socket } from 'node:net';
import { trustedClientAddress, trustedProxyHops } from '../auth/client-address';

const installed = Symbol.for('latchwell.clientAddressHook');

interface RequestStart {
  request: IncomingMessage;
  socket: Socket;
}

export function installClientAddressHook(hops = trustedProxyHops()): void {
  const holder = globalThis as { [installed]?: boolean };
  if (holder[installed]) return;
  holder[installed] = true;
  diagnosticsChannel.subscribe('http.server.request.start', (message) => {
    const { request, socket } = message as RequestStart;
    const address = trustedClientAddress(
      socket?.remoteAddress ?? request.socket?.remoteAddress,
      request.headers['x-forwarded-for'],
      hops,
    );
    if (address) request.headers['x-forwarded-for'] = address;
    else delete request.headers['x-forwarded-for'];
  });
}

installClientAddressHook();
