// A loopback TCP relay a test can cut and restore, to play an outage of PostgreSQL or Redis
// without stopping the shared test services.
import net from 'node:net';

export interface TcpProxy {
  port: number;
  /** Drop every connection and refuse new ones (connection refused, like a stopped server). */
  cut(): Promise<void>;
  /** Accept connections again on the same port. */
  restore(): Promise<void>;
  stop(): Promise<void>;
}

export async function startTcpProxy(target: { host: string; port: number }): Promise<TcpProxy> {
  const sockets = new Set<net.Socket>();
  const makeServer = () =>
    net.createServer((client) => {
      const upstream = net.connect(target.port, target.host);
      sockets.add(client);
      sockets.add(upstream);
      const drop = () => {
        client.destroy();
        upstream.destroy();
        sockets.delete(client);
        sockets.delete(upstream);
      };
      client.on('error', drop).on('close', drop);
      upstream.on('error', drop).on('close', drop);
      client.pipe(upstream);
      upstream.pipe(client);
    });
  let server: net.Server | null = makeServer();
  const listen = (s: net.Server, port: number) =>
    new Promise<number>((resolve, reject) => {
      s.once('error', reject);
      s.listen(port, '127.0.0.1', () => {
        const a = s.address();
        resolve(typeof a === 'object' && a ? a.port : port);
      });
    });
  const port = await listen(server, 0);
  const close = async () => {
    const s = server;
    server = null;
    for (const sock of sockets) sock.destroy();
    sockets.clear();
    if (s) await new Promise<void>((resolve) => s.close(() => resolve()));
  };
  return {
    port,
    cut: close,
    async restore() {
      if (server) return;
      server = makeServer();
      await listen(server, port);
    },
    stop: close,
  };
}
