/** Helpers shared by the start script, the benchmarks and the cross-process test suites. */
import { spawn, type ChildProcess, type StdioOptions } from 'node:child_process';
import { createServer } from 'node:net';

const ROOT = new URL('..', import.meta.url).pathname;

/**
 * How the API process is started everywhere (npm start, the suites, the benchmarks, the image). The heap
 * limit is there for its collection policy more than as a cap: with V8's default on a 24 GB machine the
 * heap grows lazily and a 1M-line import peaked at ≈ 350 MB RSS; with a limit set it stays ≈ 200 MB and flat
 * (npm run bench:import).
 */
export const API_NODE_ARGS = [
  '--max-old-space-size=512',
  '--import',
  'tsx',
  'apps/api/src/server.ts',
];

/** A TCP port on loopback that nothing listens on right now. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() => {
        if (typeof address === 'object' && address) resolve(address.port);
        else reject(new Error('no free port'));
      });
    });
  });
}

/** Resolves once `GET {baseUrl}/api/health` answers 200. */
export async function waitForHealth(baseUrl: string, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok) return;
    } catch {
      // Not listening yet: try again shortly.
    }
    if (Date.now() > deadline)
      throw new Error(`the API did not answer ${baseUrl}/api/health within ${timeoutMs / 1000} s`);
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
}

export interface ApiProcess {
  baseUrl: string;
  child: ChildProcess;
  stop(): Promise<void>;
}

/** How long a stopped API process may drain before its process group is killed. */
const STOP_GRACE_MS = 15_000;

/**
 * The real API (apps/api/src/server.ts) as its own process — one node process with tsx's loader, in its own
 * process group — on a free port, answered health before this resolves.
 */
export async function startApiProcess(
  env: Record<string, string>,
  options: { stdio?: StdioOptions; port?: number } = {},
): Promise<ApiProcess> {
  const port = options.port ?? (await freePort());
  const child = spawn(process.execPath, API_NODE_ARGS, {
    cwd: ROOT,
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(port), ...env },
    stdio: options.stdio ?? ['ignore', 'ignore', 'inherit'],
    detached: true,
  });
  const baseUrl = `http://127.0.0.1:${port}`;
  await waitForHealth(baseUrl);
  return {
    baseUrl,
    child,
    async stop() {
      if (child.exitCode !== null || !child.pid) return;
      const exited = new Promise((resolve) => child.once('exit', resolve));
      const group = child.pid;
      try {
        process.kill(-group, 'SIGTERM');
      } catch {
        // Already gone.
        return;
      }
      // A shutdown that cannot finish (its database stopped under it, as the outage suite does) must not
      // hold the caller: well after the drain (1.5 s by default), the group is killed.
      const killer = setTimeout(() => {
        try {
          process.kill(-group, 'SIGKILL');
        } catch {
          // Exited meanwhile.
        }
      }, STOP_GRACE_MS);
      await exited;
      clearTimeout(killer);
    },
  };
}

/** Signs in through the real login route; throws on anything but 200. */
export async function signInThroughApi(
  baseUrl: string,
  email: string,
  password: string,
): Promise<{ token: string; memberships: { farmId: number }[] }> {
  const response = await fetch(`${baseUrl}/api/v1/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (!response.ok) throw new Error(`sign-in of ${email} answered ${response.status}`);
  return (await response.json()) as { token: string; memberships: { farmId: number }[] };
}

/** Makes a gateway on a farm through the API and returns its key (shown this once). */
export async function makeGatewayKey(
  baseUrl: string,
  token: string,
  farmId: number,
  name: string,
): Promise<string> {
  const response = await fetch(`${baseUrl}/api/v1/farms/${farmId}/gateways`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}` },
    body: JSON.stringify({ name }),
  });
  if (!response.ok) throw new Error(`making a gateway answered ${response.status}`);
  return ((await response.json()) as { key: string }).key;
}
