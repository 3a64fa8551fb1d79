/**
 * `npm test`: every suite against a throwaway PostgreSQL cluster of its own.
 *   1. libs + API + integration suites (vitest, real database)
 *   2. Angular component specs (ng test, vitest under jsdom)
 *   3. browser end-to-end suites (vitest + playwright-core + Debian's Chromium) against the built app
 * Prints one closing line `N passed, N failed` and exits non-zero when anything failed.
 * `npm test -- --only=libs,api,web,e2e` runs a subset.
 */
import { ensureChromium } from './chromium';
import { spawn } from 'node:child_process';
import { chmodSync, existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startCluster } from './postgres';

interface StageResult {
  name: string;
  passed: number;
  failed: number;
  exitCode: number;
}

const ROOT = new URL('..', import.meta.url).pathname;
const only = process.argv
  .find((a) => a.startsWith('--only='))
  ?.slice('--only='.length)
  .split(',');
const wants = (stage: string) => !only || only.includes(stage);

function run(
  cmd: string,
  args: string[],
  env: NodeJS.ProcessEnv,
): Promise<{ code: number; output: string }> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    const forward = (chunk: Buffer, stream: NodeJS.WriteStream) => {
      output += chunk.toString();
      stream.write(chunk);
    };
    child.stdout.on('data', (c: Buffer) => {
      forward(c, process.stdout);
    });
    child.stderr.on('data', (c: Buffer) => {
      forward(c, process.stderr);
    });
    child.on('close', (code) => {
      resolve({ code: code ?? 1, output });
    });
  });
}

/** Counts from vitest's JSON report, which is the reliable source (its console summary is for people). */
function countsFromJson(file: string): { passed: number; failed: number } | null {
  if (!existsSync(file)) return null;
  const report = JSON.parse(readFileSync(file, 'utf8')) as {
    numPassedTests: number;
    numFailedTests: number;
  };
  return { passed: report.numPassedTests, failed: report.numFailedTests };
}

/** `ng test` prints vitest's summary; read "Tests  N passed | M failed (T)" from it. */
function countsFromSummary(output: string): { passed: number; failed: number } | null {
  const plain = output.replace(/\u001b\[[0-9;]*m/g, '');
  const line = plain
    .split('\n')
    .reverse()
    .find((l) => /^\s*Tests\s+/.test(l));
  if (!line) return null;
  const passed = Number(/(\d+) passed/.exec(line)?.[1] ?? 0);
  const failed = Number(/(\d+) failed/.exec(line)?.[1] ?? 0);
  return { passed, failed };
}

async function vitestStage(
  name: string,
  projects: string[],
  env: NodeJS.ProcessEnv,
): Promise<StageResult> {
  const reportFile = join(env['TEST_TMP'] ?? tmpdir(), `${name}-report.json`);
  const args = [
    'vitest',
    'run',
    ...projects.flatMap((p) => ['--project', p]),
    '--reporter=default',
    '--reporter=json',
    `--outputFile.json=${reportFile}`,
  ];
  const { code } = await run('npx', args, env);
  const counts = countsFromJson(reportFile) ?? { passed: 0, failed: 1 };
  return { name, ...counts, exitCode: code };
}

async function main(): Promise<void> {
  const started = Date.now();
  const tmp = mkdtempSync(join(tmpdir(), 'tierscope-test-'));
  // The unprivileged database owner must be able to reach its folder inside.
  chmodSync(tmp, 0o755);
  const port = Number(process.env['TEST_PG_PORT'] ?? 54329);
  console.log(`[test] starting a throwaway PostgreSQL on 127.0.0.1:${port} in ${tmp}`);
  // Durability is not what these tests check: fsync off keeps 2 cores busy with the tests, not the disk.
  process.env['PG_FSYNC'] = 'off';
  const cluster = startCluster({ dir: join(tmp, 'pg'), port, databases: [] });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    TEST_PG_URL: `postgres://postgres@127.0.0.1:${port}`,
    TEST_TMP: tmp,
    FORCE_COLOR: '0',
  };
  const results: StageResult[] = [];
  try {
    if (wants('libs') || wants('api')) {
      const projects = [...(wants('libs') ? ['libs'] : []), ...(wants('api') ? ['api'] : [])];
      results.push(await vitestStage('server', projects, env));
    }
    if (wants('web')) {
      const { code, output } = await run('npx', ['ng', 'test', 'web', '--watch=false'], env);
      const counts = countsFromSummary(output) ?? { passed: 0, failed: 1 };
      results.push({ name: 'web', ...counts, exitCode: code });
    }
    if (wants('e2e')) {
      // The browser suites drive Debian's Chromium: installed here when missing, like PostgreSQL.
      ensureChromium((line) => {
        console.log(`[test] ${line}`);
      });
      const build = await run('npx', ['ng', 'build', 'web'], env);
      if (build.code !== 0) {
        results.push({ name: 'e2e (web build)', passed: 0, failed: 1, exitCode: build.code });
      } else {
        results.push(await vitestStage('e2e', ['e2e'], env));
      }
    }
  } finally {
    cluster.stop();
    rmSync(tmp, { recursive: true, force: true });
  }
  const passed = results.reduce((n, r) => n + r.passed, 0);
  const failed = results.reduce(
    (n, r) => n + r.failed + (r.exitCode !== 0 && r.failed === 0 ? 1 : 0),
    0,
  );
  console.log('');
  for (const r of results) {
    console.log(
      `[test] ${r.name}: ${r.passed} passed, ${r.failed} failed${r.exitCode !== 0 ? ` (exit ${r.exitCode})` : ''}`,
    );
  }
  console.log(`[test] took ${Math.round((Date.now() - started) / 1000)} s`);
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed > 0 || results.length === 0 ? 1 : 0);
}

void main().catch((error: unknown) => {
  console.error(error);
  console.log('0 passed, 1 failed');
  process.exit(1);
});
