import { describe, expect, it } from 'vitest';
import { loadConfig } from './config';

const base = {
  DATABASE_URL: 'postgres://postgres@127.0.0.1:5432/tierscope',
  JWT_SECRET: 'x'.repeat(40),
};

describe('loadConfig', () => {
  it('takes an empty variable as not set, so mail is simply off', () => {
    const config = loadConfig({ ...base, SMTP_URL: '', MAIL_CATCHER_URL: '' });
    expect(config.smtpUrl).toBeUndefined();
    expect(config.mailCatcherUrl).toBeUndefined();
    expect(config.exceptionMailSeconds).toBe(120);
    expect(config.photoMaxBytes).toBe(8 * 1024 * 1024);
  });

  it('names the variable that is wrong', () => {
    expect(() => loadConfig({ ...base, SMTP_URL: 'http://mail' })).toThrow(
      'SMTP_URL: SMTP_URL must be an smtp:// or smtps:// URL',
    );
    expect(() => loadConfig({ ...base, IMPORT_MAX_BYTES: '-1' })).toThrow(/IMPORT_MAX_BYTES/);
  });

  it('links mails to the address it listens on unless PUBLIC_URL says otherwise', () => {
    expect(loadConfig({ ...base, PORT: '9000' }).publicUrl).toBe('http://127.0.0.1:9000');
    expect(loadConfig({ ...base, PUBLIC_URL: 'https://eggs.example' }).publicUrl).toBe(
      'https://eggs.example',
    );
  });
});
