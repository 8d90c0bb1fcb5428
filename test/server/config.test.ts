import { describe, expect, it } from 'vitest';
import { ConfigError, readServerConfig } from '../../src/server/config';

const CWD = '/srv/crankhouse';

describe('readServerConfig', () => {
  it('should use the defaults when nothing is set', () => {
    expect(readServerConfig({}, CWD)).toEqual({
      port: 8080,
      host: '0.0.0.0',
      dataDir: '/srv/crankhouse/data',
      distDir: '/srv/crankhouse/dist',
      siteName: 'Cedar Flats Compressor Station (demo)',
      seedDemo: true,
    });
  });

  it('should start empty with CRANKHOUSE_DEMO=0 and refuse words it does not understand', () => {
    expect(readServerConfig({ CRANKHOUSE_DEMO: '0' }, CWD).seedDemo).toBe(false);
    expect(readServerConfig({ CRANKHOUSE_DEMO: 'true' }, CWD).seedDemo).toBe(true);
    expect(() => readServerConfig({ CRANKHOUSE_DEMO: 'maybe' }, CWD)).toThrow(
      /CRANKHOUSE_DEMO.*use 1 to seed the demo site/,
    );
  });

  it('should treat blank variables as unset', () => {
    const config = readServerConfig({ PORT: '', HOST: '  ', CRANKHOUSE_DATA: '', CRANKHOUSE_TLS_CERT: '' }, CWD);
    expect(config.port).toBe(8080);
    expect(config.host).toBe('0.0.0.0');
    expect(config.dataDir).toBe('/srv/crankhouse/data');
    expect(config.tls).toBeUndefined();
  });

  it('should resolve relative folders against cwd and keep absolute ones', () => {
    const config = readServerConfig(
      { CRANKHOUSE_DATA: 'var/../state', CRANKHOUSE_DIST: '/opt/crankhouse/dist', CRANKHOUSE_SITE_NAME: 'North Yard' },
      CWD,
    );
    expect(config.dataDir).toBe('/srv/crankhouse/state');
    expect(config.distDir).toBe('/opt/crankhouse/dist');
    expect(config.siteName).toBe('North Yard');
  });

  // source: RFC 9293 section 3.1 (ports are 16-bit numbers, so 0..65535);
  // nodejs.org/api/net.html server.listen (port 0 asks the OS for a free port)
  it.each([
    ['0', 0],
    ['1', 1],
    ['8443', 8443],
    ['65535', 65535],
  ])('should accept PORT=%s', (raw, port) => {
    expect(readServerConfig({ PORT: raw }, CWD).port).toBe(port);
  });

  it.each(['65536', '-1', 'abc', '80.5', '1e3', '0x50', '8080abc', '123456'])(
    'should reject PORT=%s naming the variable and the allowed range',
    (raw) => {
      let caught: unknown;
      try {
        readServerConfig({ PORT: raw }, CWD);
      } catch (err) {
        caught = err;
      }
      expect(caught).toBeInstanceOf(ConfigError);
      expect((caught as ConfigError).variable).toBe('PORT');
      expect((caught as ConfigError).message).toContain(`"${raw}"`);
      expect((caught as ConfigError).message).toMatch(/^PORT: .*0 to 65535/);
    },
  );

  it('should reject a HOST with spaces', () => {
    expect(() => readServerConfig({ HOST: 'local host' }, CWD)).toThrow(/^HOST: /);
  });

  it('should read TLS files when both are set', () => {
    const config = readServerConfig(
      { CRANKHOUSE_TLS_CERT: 'tls/cert.pem', CRANKHOUSE_TLS_KEY: '/etc/ck/key.pem' },
      CWD,
    );
    expect(config.tls).toEqual({ certPath: '/srv/crankhouse/tls/cert.pem', keyPath: '/etc/ck/key.pem' });
  });

  it('should name the missing TLS variable when only one is set', () => {
    expect(() => readServerConfig({ CRANKHOUSE_TLS_CERT: 'cert.pem' }, CWD)).toThrow(
      /^CRANKHOUSE_TLS_KEY: .*both .*or neither/,
    );
    expect(() => readServerConfig({ CRANKHOUSE_TLS_KEY: 'key.pem' }, CWD)).toThrow(
      /^CRANKHOUSE_TLS_CERT: .*both .*or neither/,
    );
  });

  it('should reject a site name with a line break or one that is too long', () => {
    expect(() => readServerConfig({ CRANKHOUSE_SITE_NAME: 'North\nYard' }, CWD)).toThrow(/^CRANKHOUSE_SITE_NAME: /);
    expect(() => readServerConfig({ CRANKHOUSE_SITE_NAME: 'x'.repeat(201) }, CWD)).toThrow(/at most 200/);
  });

  it('should read CRANKHOUSE_DEMO_PASSCODE of 6 to 64 printable characters', () => {
    expect(readServerConfig({}, CWD).demoPasscode).toBeUndefined();
    expect(readServerConfig({ CRANKHOUSE_DEMO_PASSCODE: '123456' }, CWD).demoPasscode).toBe('123456');
    expect(readServerConfig({ CRANKHOUSE_DEMO_PASSCODE: 'Cedar Flats #7!' }, CWD).demoPasscode).toBe('Cedar Flats #7!');
    expect(readServerConfig({ CRANKHOUSE_DEMO_PASSCODE: 'x'.repeat(64) }, CWD).demoPasscode).toHaveLength(64);
  });

  it.each([
    ['12345', /is 5 characters long; use 6 to 64 printable ASCII/],
    ['x'.repeat(65), /is 65 characters long; use 6 to 64/],
    ['pass\tword', /not printable ASCII/],
    ['päss-wörd', /not printable ASCII/],
  ])('should refuse CRANKHOUSE_DEMO_PASSCODE=%j without repeating it', (raw, message) => {
    let caught: unknown;
    try {
      readServerConfig({ CRANKHOUSE_DEMO_PASSCODE: raw }, CWD);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(ConfigError);
    expect((caught as ConfigError).variable).toBe('CRANKHOUSE_DEMO_PASSCODE');
    expect((caught as ConfigError).message).toMatch(message);
    expect((caught as ConfigError).message).not.toContain(raw);
  });

  it('should refuse a relative cwd', () => {
    expect(() => readServerConfig({}, 'relative/dir')).toThrow(TypeError);
  });
});
