import { availableParallelism } from 'node:os';
import { describe, expect, it } from 'vitest';
import { developmentSecrets, loadConfig } from '../env.ts';

const base = { DATABASE_URL: 'postgres://cellar@127.0.0.1:5432/cellarwright' };
const real = {
  SESSION_SECRET: 'a-long-random-session-secret-for-production',
  STRIPE_SECRET_KEY: 'sk_live_real_key_from_the_provider',
  STRIPE_WEBHOOK_SECRET: 'whsec_real_signing_secret_from_the_provider',
};
const production = (env: Record<string, string | undefined>) => () => loadConfig({ ...base, NODE_ENV: 'production', ...env });

describe('loadConfig', () => {
  it('keeps the development defaults in development and tests', () => {
    for (const NODE_ENV of [undefined, 'development', 'test']) {
      const config = loadConfig({ ...base, NODE_ENV, PAYMENTS_FAKE_PORT: '4242' });
      expect(config.isProduction).toBe(false);
      expect(config.STRIPE_SECRET_KEY).toBe(developmentSecrets.STRIPE_SECRET_KEY[0]);
      expect(config.STRIPE_WEBHOOK_SECRET).toBe(developmentSecrets.STRIPE_WEBHOOK_SECRET[0]);
      expect(config.sessionSecret).toBe(developmentSecrets.SESSION_SECRET[0]);
      expect(config.PAYMENTS_FAKE_PORT).toBe(4242);
    }
  });

  it('runs one server process outside production, one per core (up to four) in production, or as many as WEB_CONCURRENCY says', () => {
    expect(loadConfig({ ...base, NODE_ENV: 'test' }).processes).toBe(1);
    expect(loadConfig({ ...base }).processes).toBe(1);
    expect(production(real)().processes).toBe(Math.min(availableParallelism(), 4));
    expect(production({ ...real, WEB_CONCURRENCY: '3' })().processes).toBe(3);
    expect(loadConfig({ ...base, NODE_ENV: 'test', WEB_CONCURRENCY: '2' }).processes).toBe(2);
    expect(() => loadConfig({ ...base, WEB_CONCURRENCY: '0' })).toThrow(/WEB_CONCURRENCY/);
  });

  it('keeps about ten connections to PostgreSQL for the machine, at least four a process, unless DATABASE_POOL_SIZE says', () => {
    expect(loadConfig({ ...base }).poolSize).toBe(10);
    expect(loadConfig({ ...base, WEB_CONCURRENCY: '2' }).poolSize).toBe(5);
    expect(loadConfig({ ...base, WEB_CONCURRENCY: '4' }).poolSize).toBe(4);
    expect(loadConfig({ ...base, WEB_CONCURRENCY: '2', DATABASE_POOL_SIZE: '12' }).poolSize).toBe(12);
  });

  it('warms each PDF render thread with three made-up audits in production, one otherwise, or as many as PDF_WARM_UP_ROUNDS says', () => {
    expect(loadConfig({ ...base }).pdfWarmUpRounds).toBe(1);
    expect(production(real)().pdfWarmUpRounds).toBe(3);
    expect(production({ ...real, PDF_WARM_UP_ROUNDS: '0' })().pdfWarmUpRounds).toBe(0);
    expect(loadConfig({ ...base, PDF_WARM_UP_ROUNDS: '2' }).pdfWarmUpRounds).toBe(2);
    expect(() => loadConfig({ ...base, PDF_WARM_UP_ROUNDS: '-1' })).toThrow(/PDF_WARM_UP_ROUNDS/);
  });

  it('starts in production with real secrets', () => {
    const config = production(real)();
    expect(config).toMatchObject({ isProduction: true, sessionSecret: real.SESSION_SECRET, ...real });
  });

  it('refuses a production start without the secrets, naming every missing one', () => {
    expect(production({})).toThrow(
      /SESSION_SECRET: required in production[\s\S]*STRIPE_SECRET_KEY: required in production[\s\S]*STRIPE_WEBHOOK_SECRET: required in production/,
    );
    expect(production({ ...real, STRIPE_WEBHOOK_SECRET: undefined })).toThrow(/^Invalid environment:\n {2}STRIPE_WEBHOOK_SECRET: required in production$/);
    expect(production({ ...real, STRIPE_SECRET_KEY: '  ' })).toThrow(/STRIPE_SECRET_KEY: required in production/);
  });

  it('refuses the public development values in production', () => {
    for (const [name, [value]] of Object.entries(developmentSecrets)) {
      const start = production({ ...real, [name]: value });
      expect(start).toThrow(new RegExp(`${name}: the development value is public`));
      // Only the variable that is wrong is named.
      for (const other of Object.keys(developmentSecrets).filter((n) => n !== name)) {
        expect(start).not.toThrow(new RegExp(other));
      }
    }
  });

  it('does not point a production instance at the local payment fake unless told to', () => {
    expect(production({ ...real, PAYMENTS_FAKE_PORT: '4242' })().PAYMENTS_FAKE_PORT).toBeUndefined();
    expect(production({ ...real, PAYMENTS_FAKE_PORT: '4242', PAYMENTS_FAKE_IN_PRODUCTION: 'true' })().PAYMENTS_FAKE_PORT).toBe(4242);
    expect(production({ ...real, STRIPE_API_HOST: 'http://127.0.0.1:4242' })).toThrow(/STRIPE_API_HOST: points at this machine/);
    expect(production({ ...real, STRIPE_API_HOST: 'localhost:4242' })).toThrow(/STRIPE_API_HOST/);
    expect(production({ ...real, STRIPE_API_HOST: '127.0.0.1:4242', PAYMENTS_FAKE_IN_PRODUCTION: 'yes' })().STRIPE_API_HOST).toBe('127.0.0.1:4242');
    expect(production({ ...real, STRIPE_API_HOST: 'https://payments-proxy.example.org' })().STRIPE_API_HOST).toBe('https://payments-proxy.example.org');
  });
});
