import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ConfigError, loadConfig } from '../../api/config';

const dirs = () => ({ dataDir: mkdtempSync(join(tmpdir(), 'driftmark-config-')), appDistDir: '/nonexistent' });

describe('Settings validated at start', () => {
  it('takes the defaults: 127.0.0.1:3000, fs storage, a development secret kept in the data folder', () => {
    const d = dirs();
    const c = loadConfig({}, d);
    expect(c.host).toBe('127.0.0.1');
    expect(c.port).toBe(3000);
    expect(c.storage).toBe('fs');
    expect(c.smtpUrl).toBeNull();
    expect(c.jwtSecret.length).toBeGreaterThanOrEqual(32);
    expect(readFileSync(join(d.dataDir, 'jwt-secret'), 'utf8').trim()).toBe(c.jwtSecret);
    // Kept: the next start reads the same secret.
    expect(loadConfig({}, d).jwtSecret).toBe(c.jwtSecret);
  });

  it('refuses every bad value at once, naming each setting', () => {
    const bad = { PORT: 'eighty', HOST: 'exa mple', PUBLIC_BASE_URL: 'ftp://x', SMTP_URL: 'http://mail', STORAGE: 'tape', TLS_CERT: '/no/such.pem' };
    let message = '';
    try {
      loadConfig(bad, dirs());
    } catch (e) {
      expect(e).toBeInstanceOf(ConfigError);
      message = (e as Error).message;
    }
    for (const name of ['PORT', 'HOST', 'PUBLIC_BASE_URL', 'SMTP_URL', 'STORAGE', 'TLS_CERT']) expect(message).withContext(name).toContain(name);
  });

  it('requires JWT_SECRET in production, and accepts one of 32 characters or more', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' }, dirs())).toThrowError(ConfigError, /JWT_SECRET is required/);
    expect(() => loadConfig({ NODE_ENV: 'production', JWT_SECRET: 'short' }, dirs())).toThrowError(ConfigError, /at least 32/);
    const c = loadConfig({ NODE_ENV: 'production', JWT_SECRET: 'x'.repeat(40), HOST: '0.0.0.0', PUBLIC_BASE_URL: 'https://bench.example.org/' }, dirs());
    expect(c.jwtSecret).toBe('x'.repeat(40));
    expect(c.host).toBe('0.0.0.0');
    expect(c.publicBaseUrl).toBe('https://bench.example.org');
  });
});
