// loadConfig: defaults, the development session secret file, production without a secret.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config.ts';

const dir = mkdtempSync(join(tmpdir(), 'tarebook-config-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('loadConfig', () => {
  it('when only SESSION_SECRET is set, then the defaults apply', () => {
    const c = loadConfig({ SESSION_SECRET: 's'.repeat(40) });
    expect(c).toMatchObject({
      port: 3000,
      dbPath: resolve('./data/tarebook.sqlite'),
      dataDir: resolve('./data'),
      production: false,
      viteMiddleware: false,
      trustProxy: 0,
      lockoutThreshold: 5,
      loginRateLimit: 30,
    });
  });

  it('when PORT=0, VITE_MIDDLEWARE=1 and TRUST_PROXY=1, then they are read', () => {
    const c = loadConfig({ SESSION_SECRET: 's'.repeat(40), PORT: '0', VITE_MIDDLEWARE: '1', TRUST_PROXY: '1' });
    expect(c).toMatchObject({ port: 0, viteMiddleware: true, trustProxy: 1 });
  });

  it('when SESSION_SECRET is missing outside production, then 48 random bytes (hex) are kept in <dataDir>/session-secret', () => {
    const env = { TAREBOOK_DB: join(dir, 'sub', 'db.sqlite') };
    const first = loadConfig(env);
    expect(first.dataDir).toBe(join(dir, 'sub'));
    expect(first.sessionSecret).toMatch(/^[0-9a-f]{96}$/);
    expect(readFileSync(join(dir, 'sub', 'session-secret'), 'utf8').trim()).toBe(first.sessionSecret);
    expect(loadConfig(env).sessionSecret).toBe(first.sessionSecret);
  });

  it('when SESSION_SECRET is missing in production, then a clear error and no secret file', () => {
    const env = { NODE_ENV: 'production', TAREBOOK_DB: join(dir, 'prod', 'db.sqlite') };
    expect(() => loadConfig(env)).toThrow(ConfigError);
    expect(() => loadConfig(env)).toThrow(/SESSION_SECRET is not set/);
    expect(existsSync(join(dir, 'prod', 'session-secret'))).toBe(false);
  });

  it('when AUDIT_CHAIN_KEY is missing in production, then a clear error and no key file; outside production the key is generated once into the data folder', () => {
    const env = { NODE_ENV: 'production', SESSION_SECRET: 's'.repeat(40), TAREBOOK_DB: join(dir, 'prod2', 'db.sqlite') };
    expect(() => loadConfig(env)).toThrow(/AUDIT_CHAIN_KEY is not set/);
    expect(existsSync(join(dir, 'prod2', 'audit-chain-key'))).toBe(false);
    expect(() => loadConfig({ ...env, AUDIT_CHAIN_KEY: 'short' })).toThrow(/at least 32 characters/);
    expect(loadConfig({ ...env, AUDIT_CHAIN_KEY: 'k'.repeat(40) }).auditChainKey).toBe('k'.repeat(40));
    const dev = { SESSION_SECRET: 's'.repeat(40), TAREBOOK_DB: join(dir, 'dev2', 'db.sqlite') };
    const first = loadConfig(dev);
    expect(first.auditChainKey).toMatch(/^[0-9a-f]{96}$/);
    expect(loadConfig(dev).auditChainKey).toBe(first.auditChainKey);
    expect(first.auditAnchorFile).toBe(join(dir, 'dev2', 'audit-anchors.log'));
  });

  it('when SESSION_SECRET is too short or PORT is not a number, then a ConfigError', () => {
    expect(() => loadConfig({ SESSION_SECRET: 'short' })).toThrow(/at least 32 characters/);
    expect(() => loadConfig({ SESSION_SECRET: 's'.repeat(40), PORT: 'eighty' })).toThrow(/PORT/);
  });
});
