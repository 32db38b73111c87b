/**
 * Server configuration from the environment. Read once at start-up; tests pass their own `env`.
 */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';

export interface Config {
  port: number;
  host: string;
  dbPath: string;
  dataDir: string;
  production: boolean;
  sessionSecret: string;
  /** Key of the audit chain's HMAC (AUDIT_CHAIN_KEY; outside production generated once into <dataDir>/audit-chain-key). */
  auditChainKey: string;
  /** Append-only log of chain heads (AUDIT_ANCHOR_FILE, default <dataDir>/audit-anchors.log). */
  auditAnchorFile: string;
  viteMiddleware: boolean;
  /** Number of proxy hops to trust for X-Forwarded-For (TRUST_PROXY); 0 = none (STACK P10). */
  trustProxy: number;
  /** Failed sign-in attempts allowed per IP and window before 429 (LOGIN_RATE_LIMIT, default 30). */
  loginRateLimit: number;
  loginRateWindowMs: number;
  /** Consecutive failed sign-ins that lock an account (REQUIREMENTS PW-03 default 5). */
  lockoutThreshold: number;
  /** Base of the per-account delay after a failed sign-in, ms, doubling per failure (LOGIN_DELAY_MS, default 1000; 0 = off). */
  loginDelayMs: number;
  /** Base of the links in e-mails (PUBLIC_URL); null = http://localhost:<port> once listening. */
  publicUrl: string | null;
  mail: MailConfig;
  /** Seed the demo lab's working standards with it (DEMO_WORKING_STANDARDS, default on; "0" seeds stocks only, as the browser tests do). */
  demoWorkingStandards: boolean;
}

/**
 * E-mail (MAIL_MODE): "fake" (default outside production) runs a local SMTP server and keeps what it receives
 * in the Outbox; "smtp" sends through SMTP_HOST/SMTP_PORT/SMTP_SECURE/SMTP_USER/SMTP_PASS; "off" queues only.
 */
export interface MailConfig {
  mode: 'fake' | 'smtp' | 'off';
  from: string;
  smtpHost: string;
  smtpPort: number;
  smtpSecure: boolean;
  smtpUser: string;
  smtpPass: string;
}

export class ConfigError extends Error {
  override name = 'ConfigError';
}

const MIN_SECRET_LENGTH = 32; // iron-session refuses shorter passwords

function intFrom(env: NodeJS.ProcessEnv, key: string, fallback: number, min = 0): number {
  const raw = env[key];
  if (raw === undefined || raw === '') return fallback;
  if (!/^\d+$/.test(raw) || Number(raw) < min) {
    throw new ConfigError(`${key} must be a whole number ≥ ${min}, got "${raw}"`);
  }
  return Number(raw);
}

/** Reads `<dataDir>/session-secret`, creating it with 48 random bytes (hex) the first time. */
function devSessionSecret(dataDir: string): string {
  const file = join(dataDir, 'session-secret');
  if (existsSync(file)) {
    const stored = readFileSync(file, 'utf8').trim();
    if (stored.length >= MIN_SECRET_LENGTH) return stored;
  }
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(48).toString('hex');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  return secret;
}

export const MIN_CHAIN_KEY_LENGTH = 32;

/** Reads `<dataDir>/audit-chain-key`, creating it with 48 random bytes (hex) the first time (outside production). */
export function devChainKey(dataDir: string): string {
  const file = join(dataDir, 'audit-chain-key');
  if (existsSync(file)) {
    const stored = readFileSync(file, 'utf8').trim();
    if (stored.length >= MIN_CHAIN_KEY_LENGTH) return stored;
  }
  mkdirSync(dataDir, { recursive: true });
  const key = randomBytes(48).toString('hex');
  writeFileSync(file, key + '\n', { mode: 0o600 });
  return key;
}

/** The default anchor log beside the database (audit.service.ts writeAnchor). */
export const defaultAnchorFile = (dataDir: string) => join(dataDir, 'audit-anchors.log');

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const production = env.NODE_ENV === 'production';
  const dbPath = resolve(env.TAREBOOK_DB || './data/tarebook.sqlite');
  const dataDir = dirname(dbPath);

  let sessionSecret = env.SESSION_SECRET ?? '';
  if (sessionSecret) {
    if (sessionSecret.length < MIN_SECRET_LENGTH) {
      throw new ConfigError(`SESSION_SECRET must be at least ${MIN_SECRET_LENGTH} characters long`);
    }
  } else if (production) {
    throw new ConfigError(
      'SESSION_SECRET is not set. In production set it to a random string of at least 32 characters, ' +
        'e.g. the output of: node -e "console.log(require(\'crypto\').randomBytes(48).toString(\'hex\'))"',
    );
  } else {
    sessionSecret = devSessionSecret(dataDir);
  }

  let auditChainKey = env.AUDIT_CHAIN_KEY ?? '';
  if (auditChainKey) {
    if (auditChainKey.length < MIN_CHAIN_KEY_LENGTH) throw new ConfigError(`AUDIT_CHAIN_KEY must be at least ${MIN_CHAIN_KEY_LENGTH} characters long`);
  } else if (production) {
    throw new ConfigError(
      'AUDIT_CHAIN_KEY is not set. In production set it to a random string of at least 32 characters, kept outside the database ' +
        '(the audit chain is keyed with it), e.g. the output of: node -e "console.log(require(\'crypto\').randomBytes(48).toString(\'hex\'))"',
    );
  } else {
    auditChainKey = devChainKey(dataDir);
  }

  return {
    port: intFrom(env, 'PORT', 3000),
    host: env.HOST || '0.0.0.0',
    dbPath,
    dataDir,
    production,
    sessionSecret,
    auditChainKey,
    auditAnchorFile: env.AUDIT_ANCHOR_FILE ? resolve(env.AUDIT_ANCHOR_FILE) : defaultAnchorFile(dataDir),
    viteMiddleware: env.VITE_MIDDLEWARE === '1',
    trustProxy: env.TRUST_PROXY && /^\d+$/.test(env.TRUST_PROXY) ? Number(env.TRUST_PROXY) : env.TRUST_PROXY ? 1 : 0,
    loginRateLimit: intFrom(env, 'LOGIN_RATE_LIMIT', 30, 1),
    loginRateWindowMs: 15 * 60 * 1000,
    lockoutThreshold: intFrom(env, 'LOCKOUT_THRESHOLD', 5, 3),
    loginDelayMs: intFrom(env, 'LOGIN_DELAY_MS', 1000),
    publicUrl: env.PUBLIC_URL ? env.PUBLIC_URL.replace(/\/+$/, '') : null,
    mail: mailConfig(env, production),
    demoWorkingStandards: env.DEMO_WORKING_STANDARDS !== '0',
  };
}

function mailConfig(env: NodeJS.ProcessEnv, production: boolean): MailConfig {
  // production without MAIL_MODE: smtp when SMTP_HOST is set, else "off" (mail stays queued, nothing leaves)
  const mode = env.MAIL_MODE || (production ? (env.SMTP_HOST ? 'smtp' : 'off') : 'fake');
  if (mode !== 'fake' && mode !== 'smtp' && mode !== 'off') throw new ConfigError(`MAIL_MODE must be fake, smtp or off, got "${mode}"`);
  if (mode === 'smtp' && !env.SMTP_HOST) throw new ConfigError('MAIL_MODE=smtp needs SMTP_HOST (and usually SMTP_PORT, SMTP_USER, SMTP_PASS, MAIL_FROM)');
  return {
    mode,
    from: env.MAIL_FROM || 'Tarebook <tarebook@harbourside.example>',
    smtpHost: env.SMTP_HOST ?? '',
    smtpPort: intFrom(env, 'SMTP_PORT', 587, 1),
    smtpSecure: env.SMTP_SECURE === '1' || env.SMTP_SECURE === 'true',
    smtpUser: env.SMTP_USER ?? '',
    smtpPass: env.SMTP_PASS ?? '',
  };
}
