import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config.ts';

const BASE = {
  DATABASE_URL: 'postgres://localhost/x',
  SESSION_SECRET: 'a-session-secret-for-tests',
  GOOGLE_CLIENT_ID: 'id',
  GOOGLE_CLIENT_SECRET: 'secret',
};

describe('TRUST_PROXY', () => {
  it('trusts no proxy unless told, so the client address is the socket address', () => {
    expect(loadConfig(BASE).TRUST_PROXY).toBe(false);
    expect(loadConfig({ ...BASE, TRUST_PROXY: 'false' }).TRUST_PROXY).toBe(false);
  });

  it('takes a number of hops, or addresses, CIDR ranges and named ranges', () => {
    expect(loadConfig({ ...BASE, TRUST_PROXY: '1' }).TRUST_PROXY).toBe(1);
    expect(loadConfig({ ...BASE, TRUST_PROXY: 'loopback' }).TRUST_PROXY).toEqual(['loopback']);
    expect(loadConfig({ ...BASE, TRUST_PROXY: 'loopback, 10.0.0.0/8 ,2001:db8::/32,192.0.2.4' }).TRUST_PROXY).toEqual([
      'loopback',
      '10.0.0.0/8',
      '2001:db8::/32',
      '192.0.2.4',
    ]);
  });

  it('refuses true and anything that is not an address, naming the setting', () => {
    expect(() => loadConfig({ ...BASE, TRUST_PROXY: 'true' })).toThrow(
      /TRUST_PROXY: true would let any client choose its address/,
    );
    expect(() => loadConfig({ ...BASE, TRUST_PROXY: 'proxy.internal' })).toThrow(
      /TRUST_PROXY: give false, a number of proxies/,
    );
    expect(() => loadConfig({ ...BASE, TRUST_PROXY: '10.0.0.0/33' })).toThrow(/TRUST_PROXY/);
    expect(() => loadConfig({ ...BASE, TRUST_PROXY: 'loopback/8' })).toThrow(/TRUST_PROXY/);
  });
});

describe('rate-limit settings', () => {
  it('have defaults: 30 sign-ins, 30 refused answer links, 20 refused invitations, 30 unknown feeds per 15 minutes', () => {
    const config = loadConfig(BASE);
    expect([
      config.SIGN_IN_RATE_LIMIT,
      config.ANSWER_LINK_RATE_LIMIT,
      config.INVITE_LINK_RATE_LIMIT,
      config.FEED_RATE_LIMIT,
    ]).toEqual([30, 30, 20, 30]);
    expect(config.RATE_LIMIT_WINDOW_SECONDS).toBe(900);
    expect(config.RATE_LIMIT_PREFIX).toBe('waterline:rate');
  });

  it('refuse a limit below one and a prefix with spaces', () => {
    expect(() => loadConfig({ ...BASE, ANSWER_LINK_RATE_LIMIT: '0' })).toThrow(/ANSWER_LINK_RATE_LIMIT/);
    expect(() => loadConfig({ ...BASE, RATE_LIMIT_PREFIX: 'two words' })).toThrow(/RATE_LIMIT_PREFIX/);
  });
});

describe('production settings', () => {
  const PROD = {
    ...BASE,
    NODE_ENV: 'production',
    PUBLIC_URL: 'https://plan.tideway.example',
    LINK_SECRET: 'l'.repeat(40),
    SESSION_SECRET: 's'.repeat(40),
  };

  it('load when every required setting is given', () => {
    expect(loadConfig(PROD).PUBLIC_URL).toBe('https://plan.tideway.example');
  });

  it('refuse a missing PUBLIC_URL or LINK_SECRET, naming each', () => {
    const { PUBLIC_URL: _url, LINK_SECRET: _link, ...rest } = PROD;
    expect(() => loadConfig(rest)).toThrow(
      /PUBLIC_URL: is required in production[\s\S]*LINK_SECRET: is required in production/,
    );
  });

  it('refuse the example and local session secrets', () => {
    expect(() => loadConfig({ ...PROD, SESSION_SECRET: 'change-me-to-a-long-random-string' })).toThrow(
      /cannot be used in production/,
    );
    expect(() => loadConfig({ ...PROD, SESSION_SECRET: 'local-only-session-secret-not-for-production' })).toThrow(
      /cannot be used in production/,
    );
  });

  it('outside production keep the local defaults', () => {
    expect(loadConfig(BASE).PUBLIC_URL).toBe('http://127.0.0.1:3000');
  });
});
