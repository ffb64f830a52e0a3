/**
 * A loopback TCP relay the tests can cut and restore, to make the database "go away" for
 * one server instance without stopping the PostgreSQL every other test is using.
 */
import net from 'node:net';

export interface TcpProxy {
  port: number;
  /** Refuse new connections and drop the open ones. */
  cut(): Promise<void>;
  /** Accept connections again on the same port. */
  restore(): Promise<void>;
  close(): Promise<void>;
  /** Bytes relayed from the target to the clients so far (what the database sent). */
  readonly bytesFromTarget: number;
}

export async function startTcpProxy(targetHost: string, targetPort: number): Promise<TcpProxy> {
  const sockets = new Set<net.Socket>();
  let server: net.Server;
  let port = 0;
  let bytesFromTarget = 0;

  const listen = () =>
    new Promise<void>((resolve, reject) => {
      server = net.createServer((client) => {
        const upstream = net.connect(targetPort, targetHost);
        sockets.add(client).add(upstream);
        const drop = () => {
          client.destroy();
          upstream.destroy();
          sockets.delete(client);
          sockets.delete(upstream);
        };
        upstream.on('data', (chunk: Buffer) => {
          bytesFromTarget += chunk.length;
        });
        client.on('error', drop).on('close', drop);
        upstream.on('error', drop).on('close', drop);
        client.pipe(upstream).pipe(client);
      });
      server.once('error', reject);
      server.listen(port, '127.0.0.1', () => {
        port = (server.address() as net.AddressInfo).port;
        resolve();
      });
    });

  const stop = () =>
    new Promise<void>((resolve) => {
      for (const s of sockets) s.destroy();
      sockets.clear();
      server.close(() => resolve());
    });

  await listen();
  return {
    get port() {
      return port;
    },
    get bytesFromTarget() {
      return bytesFromTarget;
    },
    cut: stop,
    restore: listen,
    close: stop,
  };
}
