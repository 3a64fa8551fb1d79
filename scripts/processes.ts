/** Helpers shared by the start script, the benchmarks and the cross-process test suites. */
import { spawn, type ChildProcess, type StdioOptions } from 'node:child_process';
import { createServer } from 'node:net';

const ROOT = new URL('..', import.meta.url).pathname;

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

/**
 * The real API (apps/api/src/server.ts) as its own process — one node process with tsx's loader, in its own
 * process group — on a free port, answered health before this resolves.
 */
export async function startApiProcess(
  env: Record<string, string>,
  options: { stdio?: StdioOptions } = {},
): Promise<ApiProcess> {
  const port = await freePort();
  const child = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/server.ts'], {
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
      try {
        process.kill(-child.pid, 'SIGTERM');
      } catch {
        // Already gone.
        return;
      }
      await exited;
    },
  };
}
