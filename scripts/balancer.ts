/**
 * A small load balancer in front of several API processes (http-proxy, ADR 0005): HTTP and the live
 * WebSocket, round robin over the processes whose /api/health/ready answers 200 (asked every 500 ms), so a
 * process that is stopping (it fails readiness at once, then waits before it closes) gets no new work.
 * A request refused because its process went away before the next check is answered 502 with a JSON
 * error; gateways and the browser retry.
 */
import { createServer, type IncomingMessage, type Server } from 'node:http';
import type { Duplex } from 'node:stream';
import httpProxy from 'http-proxy';

export interface Balancer {
  readonly server: Server;
  readonly port: number;
  /** the targets answering ready at the last check */
  ready(): string[];
  close(): Promise<void>;
}

const CHECK_MS = 500;

export async function startBalancer(options: {
  port: number;
  host?: string;
  targets: readonly string[];
}): Promise<Balancer> {
  const proxy = httpProxy.createProxyServer({ ws: true, xfwd: true });
  const healthy = new Set<string>();
  let next = 0;

  const check = async () => {
    await Promise.all(
      options.targets.map(async (target) => {
        try {
          const response = await fetch(`${target}/api/health/ready`, {
            signal: AbortSignal.timeout(2000),
          });
          if (response.ok) healthy.add(target);
          else healthy.delete(target);
        } catch {
          healthy.delete(target);
        }
      }),
    );
  };
  await check();
  const timer = setInterval(() => void check(), CHECK_MS);

  const pick = (): string | null => {
    const up = options.targets.filter((t) => healthy.has(t));
    if (up.length === 0) return null;
    next = (next + 1) % up.length;
    return up[next] ?? null;
  };

  proxy.on('error', (error, _req, res) => {
    if ('writeHead' in res && !res.headersSent) {
      res.writeHead(502, { 'content-type': 'application/json' });
      res.end(
        JSON.stringify({
          error: { code: 'unavailable', message: `No API process answered (${error.message})` },
        }),
      );
    } else if ('destroy' in res) res.destroy();
  });

  const server = createServer((req, res) => {
    const target = pick();
    if (!target) {
      res.writeHead(503, { 'content-type': 'application/json', 'retry-after': '1' });
      res.end(
        JSON.stringify({ error: { code: 'unavailable', message: 'No API process is ready' } }),
      );
      return;
    }
    proxy.web(req, res, { target });
  });
  server.on('upgrade', (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    socket.on('error', () => undefined);
    const target = pick();
    if (!target) {
      socket.destroy();
      return;
    }
    proxy.ws(req, socket, head, { target });
  });
  // As the API's own: longer than clients' keep-alive reuse.
  server.keepAliveTimeout = 65_000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port, options.host ?? '127.0.0.1', () => {
      resolve();
    });
  });
  const address = server.address();
  return {
    server,
    port: typeof address === 'object' && address ? address.port : options.port,
    ready: () => options.targets.filter((t) => healthy.has(t)),
    async close() {
      clearInterval(timer);
      server.closeAllConnections();
      await new Promise((resolve) => server.close(resolve));
      proxy.close();
    },
  };
}
