import { isAbsolute, resolve } from 'node:path';

export interface TlsFiles {
  certPath: string;
  keyPath: string;
}

export interface ServerConfig {
  port: number;
  host: string;
  dataDir: string;
  distDir: string;
  siteName: string;
  /** Seed the invented demo site into an empty database (CRANKHOUSE_DEMO, default on). */
  seedDemo: boolean;
  /** One passcode for every demo person (CRANKHOUSE_DEMO_PASSCODE); unset gives each a random 6-digit one. */
  demoPasscode?: string;
  tls?: TlsFiles;
}

export const DEFAULT_PORT = 8080;
export const DEFAULT_HOST = '0.0.0.0';
export const DEFAULT_SITE_NAME = 'Cedar Flats Compressor Station (demo)';
/** The same limit as the `SiteSummary` wire schema. */
const MAX_SITE_NAME_LENGTH = 200;

/** A setting in the environment is wrong; `variable` names it. */
export class ConfigError extends Error {
  readonly variable: string;

  constructor(variable: string, message: string) {
    super(`${variable}: ${message}`);
    this.name = 'ConfigError';
    this.variable = variable;
  }
}

/** An unset or blank variable counts as not given. */
function read(env: Record<string, string | undefined>, name: string): string | undefined {
  const value = env[name]?.trim();
  return value ? value : undefined;
}

function readPort(raw: string | undefined): number {
  if (raw === undefined) return DEFAULT_PORT;
  const port = /^\d{1,5}$/.test(raw) ? Number(raw) : Number.NaN;
  if (!(port >= 0 && port <= 65535)) {
    throw new ConfigError('PORT', `"${raw}" is not a port; use a whole number from 0 to 65535 (0 picks a free port)`);
  }
  return port;
}

function readHost(raw: string | undefined): string {
  if (raw === undefined) return DEFAULT_HOST;
  if (/\s/.test(raw)) {
    throw new ConfigError(
      'HOST',
      `"${raw}" contains spaces; use a host name or IP address such as 0.0.0.0 or 127.0.0.1`,
    );
  }
  return raw;
}

function readSiteName(raw: string | undefined): string {
  if (raw === undefined) return DEFAULT_SITE_NAME;
  if (raw.length > MAX_SITE_NAME_LENGTH) {
    throw new ConfigError(
      'CRANKHOUSE_SITE_NAME',
      `is ${raw.length} characters long; use at most ${MAX_SITE_NAME_LENGTH}`,
    );
  }
  // biome-ignore lint/suspicious/noControlCharactersInRegex: the point is to reject control characters
  if (/[\u0000-\u001f\u007f]/.test(raw)) {
    throw new ConfigError('CRANKHOUSE_SITE_NAME', 'contains control characters (such as a line break); use plain text');
  }
  return raw;
}

function readTls(cert: string | undefined, key: string | undefined, cwd: string): TlsFiles | undefined {
  if (cert === undefined && key === undefined) return undefined;
  if (cert === undefined) {
    throw new ConfigError(
      'CRANKHOUSE_TLS_CERT',
      'is not set but CRANKHOUSE_TLS_KEY is; set both (PEM files) or neither',
    );
  }
  if (key === undefined) {
    throw new ConfigError(
      'CRANKHOUSE_TLS_KEY',
      'is not set but CRANKHOUSE_TLS_CERT is; set both (PEM files) or neither',
    );
  }
  return { certPath: resolve(cwd, cert), keyPath: resolve(cwd, key) };
}

function readDemo(raw: string | undefined): boolean {
  if (raw === undefined || raw === '1' || raw === 'true') return true;
  if (raw === '0' || raw === 'false') return false;
  throw new ConfigError(
    'CRANKHOUSE_DEMO',
    `"${raw}" is not understood; use 1 to seed the demo site on first start or 0 to start empty`,
  );
}

/** 6 to 64 printable ASCII characters (space to tilde). */
const DEMO_PASSCODE = /^[\x20-\x7e]{6,64}$/;

function readDemoPasscode(raw: string | undefined): string | undefined {
  if (raw === undefined) return undefined;
  // The value is a secret: the message describes it without repeating it.
  if (!DEMO_PASSCODE.test(raw)) {
    throw new ConfigError(
      'CRANKHOUSE_DEMO_PASSCODE',
      `is ${raw.length} characters long${/[^\x20-\x7e]/.test(raw) ? ' and holds characters that are not printable ASCII' : ''}; use 6 to 64 printable ASCII characters (letters, digits, punctuation)`,
    );
  }
  return raw;
}

/**
 * Reads the server settings from environment variables. Pure: it touches no files, so the caller
 * decides whether folders exist. Relative paths are resolved against `cwd`.
 */
export function readServerConfig(env: Record<string, string | undefined>, cwd: string): ServerConfig {
  if (!isAbsolute(cwd)) throw new TypeError(`cwd must be an absolute path, got "${cwd}"`);
  const tls = readTls(read(env, 'CRANKHOUSE_TLS_CERT'), read(env, 'CRANKHOUSE_TLS_KEY'), cwd);
  const demoPasscode = readDemoPasscode(read(env, 'CRANKHOUSE_DEMO_PASSCODE'));
  return {
    port: readPort(read(env, 'PORT')),
    host: readHost(read(env, 'HOST')),
    dataDir: resolve(cwd, read(env, 'CRANKHOUSE_DATA') ?? 'data'),
    distDir: resolve(cwd, read(env, 'CRANKHOUSE_DIST') ?? 'dist'),
    siteName: readSiteName(read(env, 'CRANKHOUSE_SITE_NAME')),
    seedDemo: readDemo(read(env, 'CRANKHOUSE_DEMO')),
    ...(demoPasscode === undefined ? {} : { demoPasscode }),
    ...(tls ? { tls } : {}),
  };
}
