/**
 * Runs a private PostgreSQL cluster for `npm start` and `npm test`: Debian's server binaries, a data folder
 * of our own, listening on 127.0.0.1 only. PostgreSQL refuses to run as root, so as root the cluster is
 * owned and run by the unprivileged `postgres` user that Debian's package creates.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { chmodSync, chownSync, existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { userInfo } from 'node:os';
import { join } from 'node:path';

const PG_ROOT = '/usr/lib/postgresql';
export const isRoot = userInfo().uid === 0;

export interface Cluster {
  readonly dir: string;
  readonly port: number;
  readonly url: (database: string) => string;
  stop(): void;
}

function serverBinDir(): string | null {
  if (!existsSync(PG_ROOT)) return null;
  const versions = readdirSync(PG_ROOT)
    .filter((v) => existsSync(join(PG_ROOT, v, 'bin', 'pg_ctl')))
    .sort((a, b) => Number(b) - Number(a));
  return versions[0] ? join(PG_ROOT, versions[0], 'bin') : null;
}

/** Finds the server binaries, installing Debian's package when we can; otherwise says what to install. */
export function ensurePostgres(log: (line: string) => void = console.log): string {
  let bin = serverBinDir();
  if (bin) return bin;
  if (!isRoot) {
    throw new Error(
      'PostgreSQL server binaries not found under /usr/lib/postgresql. Install them with ' +
        '`sudo apt-get install -y postgresql` (Debian/Ubuntu) and run this again.',
    );
  }
  log('PostgreSQL is not installed: installing Debian package "postgresql" (about a minute)…');
  installDebianPackage('postgresql');
  bin = serverBinDir();
  if (!bin)
    throw new Error(
      'apt-get installed postgresql but no pg_ctl was found under /usr/lib/postgresql',
    );
  return bin;
}

/** Installs one of Debian's packages (as root: the callers check and say what to run otherwise). */
export function installDebianPackage(name: string): void {
  run('apt-get', ['update', '-qq']);
  run('apt-get', ['install', '-y', '-qq', name], { DEBIAN_FRONTEND: 'noninteractive' });
}

function run(cmd: string, args: string[], env: Record<string, string> = {}): string {
  const result = spawnSync(cmd, args, { env: { ...process.env, ...env }, encoding: 'utf8' });
  if (result.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} failed:\n${result.stderr || result.stdout}`);
  }
  return result.stdout;
}

/** Runs a server binary as the cluster's owner. */
function asOwner(bin: string, tool: string, args: string[]): string {
  const path = join(bin, tool);
  return isRoot ? run('runuser', ['-u', 'postgres', '--', path, ...args]) : run(path, args);
}

function giveToOwner(dir: string): void {
  mkdirSync(dir, { recursive: true });
  if (isRoot) execFileSync('chown', ['-R', 'postgres:postgres', dir]);
}

/**
 * Starts (creating when new) a cluster in `dir` on `port` and makes sure `database` exists.
 * Trust authentication is safe here because the server listens on loopback and a private socket folder only.
 */
export function startCluster(options: { dir: string; port: number; databases: string[] }): Cluster {
  const bin = ensurePostgres();
  const dataDir = join(options.dir, 'pgdata');
  const socketDir = join(options.dir, 'sock');
  mkdirSync(options.dir, { recursive: true });
  // The owner must be able to reach its folders (mkdtemp makes 0700 folders).
  chmodSync(options.dir, 0o755);
  giveToOwner(socketDir);
  if (!existsSync(join(dataDir, 'PG_VERSION'))) {
    giveToOwner(dataDir);
    asOwner(bin, 'initdb', [
      '-D',
      dataDir,
      '-U',
      'postgres',
      '--auth=trust',
      '-E',
      'UTF8',
      '--locale=C.UTF-8',
    ]);
  }
  const logFile = join(options.dir, 'postgres.log');
  writeFileSync(logFile, '', { flag: 'a' });
  if (isRoot) chownSync(logFile, ...postgresIds());
  const status = spawnSync(isRoot ? 'runuser' : join(bin, 'pg_ctl'), [
    ...(isRoot ? ['-u', 'postgres', '--', join(bin, 'pg_ctl')] : []),
    '-D',
    dataDir,
    'status',
  ]);
  if (status.status !== 0) {
    asOwner(bin, 'pg_ctl', [
      '-D',
      dataDir,
      '-l',
      logFile,
      '-w',
      '-t',
      '60',
      'start',
      '-o',
      `-p ${options.port} -c listen_addresses=127.0.0.1 -k ${socketDir} -c fsync=${process.env['PG_FSYNC'] ?? 'on'}`,
    ]);
  }
  const url = (database: string) => `postgres://postgres@127.0.0.1:${options.port}/${database}`;
  for (const database of options.databases) {
    const exists = run(join(bin, 'psql'), [
      '-h',
      '127.0.0.1',
      '-p',
      String(options.port),
      '-U',
      'postgres',
      '-tAc',
      `select 1 from pg_database where datname = '${database.replace(/'/g, "''")}'`,
      'postgres',
    ]).trim();
    if (exists !== '1') {
      run(join(bin, 'createdb'), [
        '-h',
        '127.0.0.1',
        '-p',
        String(options.port),
        '-U',
        'postgres',
        database,
      ]);
    }
  }
  return {
    dir: options.dir,
    port: options.port,
    url,
    stop: () => {
      asOwner(bin, 'pg_ctl', ['-D', dataDir, '-m', 'fast', '-w', 'stop']);
    },
  };
}

function postgresIds(): [number, number] {
  const uid = Number(run('id', ['-u', 'postgres']).trim());
  const gid = Number(run('id', ['-g', 'postgres']).trim());
  return [uid, gid];
}

/** Drops and recreates a database (for `npm start -- --reset`). */
export function recreateDatabase(port: number, database: string): void {
  const bin = ensurePostgres();
  const common = ['-h', '127.0.0.1', '-p', String(port), '-U', 'postgres'];
  run(join(bin, 'dropdb'), [...common, '--if-exists', '--force', database]);
  run(join(bin, 'createdb'), [...common, database]);
}
