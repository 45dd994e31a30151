import { describe, expect, it } from 'vitest';
import { csrfKey, isValidAnonymousCsrfToken, issueAnonymousCsrfToken, sameToken } from '../csrf.ts';
import { clientAddressKey } from '../login-throttle.ts';

describe('anonymous CSRF tokens', () => {
  const key = csrfKey('a-session-secret-for-this-test');

  it('verifies a token it issued, and no other', () => {
    const token = issueAnonymousCsrfToken(key);
    expect(isValidAnonymousCsrfToken(key, token)).toBe(true);
    expect(issueAnonymousCsrfToken(key)).not.toBe(token);
    const [nonce, mac] = token.split('.');
    expect(isValidAnonymousCsrfToken(key, `${nonce}x.${mac}`)).toBe(false);
    expect(isValidAnonymousCsrfToken(key, `${nonce}.${mac!.slice(1)}`)).toBe(false);
    expect(isValidAnonymousCsrfToken(key, `${token}.more`)).toBe(false);
    expect(isValidAnonymousCsrfToken(key, undefined)).toBe(false);
    expect(isValidAnonymousCsrfToken(key, '')).toBe(false);
    // Another secret, another key: tokens do not carry over.
    expect(isValidAnonymousCsrfToken(csrfKey('another-session-secret'), token)).toBe(false);
  });

  it('compares tokens whole', () => {
    expect(sameToken('abc', 'abc')).toBe(true);
    expect(sameToken('abc', 'abd')).toBe(false);
    expect(sameToken('abc', 'abcd')).toBe(false);
    expect(sameToken(undefined, undefined)).toBe(false);
    expect(sameToken('', '')).toBe(false);
  });
});

describe('the address a sign-in limit counts', () => {
  it('keeps IPv4 addresses apart, also when a dual-stack socket reports them mapped into IPv6', () => {
    expect(clientAddressKey('203.0.113.7')).toBe('203.0.113.7');
    expect(clientAddressKey('::ffff:203.0.113.7')).toBe('203.0.113.7');
    expect(clientAddressKey('::ffff:198.51.100.1')).not.toBe(clientAddressKey('::ffff:203.0.113.7'));
  });

  it('groups an IPv6 address with its /56 network', () => {
    expect(clientAddressKey('2001:db8:1:2::5')).toBe(clientAddressKey('2001:db8:1:ff::9'));
    expect(clientAddressKey('2001:db8:1:2::5')).not.toBe(clientAddressKey('2001:db8:2:2::5'));
    expect(clientAddressKey(undefined)).toBe('unknown');
  });
});
