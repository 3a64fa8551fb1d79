import { existsSync } from 'node:fs';
import { installDebianPackage, isRoot } from './postgres';

/** Where the browser tests find Chromium: CHROMIUM_PATH, else Debian's package. */
export function chromiumPath(): string {
  return process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
}

/**
 * Finds Chromium for the browser tests, installing Debian's package when it is missing and we can (as
 * `ensurePostgres` does for the database); otherwise says what to install.
 */
export function ensureChromium(log: (line: string) => void = console.log): string {
  const path = chromiumPath();
  if (existsSync(path)) return path;
  if (process.env['CHROMIUM_PATH'] || !isRoot) {
    throw new Error(
      `Chromium not found at ${path}. Install it with \`sudo apt-get install -y chromium\` ` +
        '(Debian/Ubuntu), or set CHROMIUM_PATH to a Chromium binary, and run this again.',
    );
  }
  log('Chromium is not installed: installing Debian package "chromium" (a minute or two)…');
  installDebianPackage('chromium');
  if (!existsSync(path)) throw new Error(`apt-get installed chromium but ${path} is not there`);
  return path;
}
