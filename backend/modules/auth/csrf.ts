import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { CookieOptions, Request, Response } from 'express';

/**
 * CSRF tokens. A signed-in session keeps its token in the session row. An anonymous visitor (the sign-in,
 * password reset, invitation and unlock forms) gets a signed double-submit token instead, so no session row
 * is stored for anyone who has not signed in: a random nonce and an HMAC over it, set as an HttpOnly cookie
 * and returned in the body; a state-changing request sends the body copy as `X-CSRF-Token`, and both must
 * match and carry a valid signature. Another site can neither read the token nor mint one.
 */

export const anonymousCsrfCookie = 'cw.csrf';

export const newSessionCsrfToken = () => randomBytes(24).toString('base64url');

/** The key for anonymous tokens, derived from the session secret so it never signs anything else. */
export const csrfKey = (sessionSecret: string) => createHmac('sha256', sessionSecret).update('cellarwright anonymous csrf').digest();

const sign = (key: Buffer, nonce: string) => createHmac('sha256', key).update(nonce).digest('base64url');

export function issueAnonymousCsrfToken(key: Buffer): string {
  const nonce = randomBytes(18).toString('base64url');
  return `${nonce}.${sign(key, nonce)}`;
}

export function isValidAnonymousCsrfToken(key: Buffer, token: string | undefined): boolean {
  if (!token || token.length > 200) return false;
  const [nonce, mac, ...rest] = token.split('.');
  if (!nonce || !mac || rest.length) return false;
  const want = Buffer.from(sign(key, nonce));
  const got = Buffer.from(mac);
  return got.length === want.length && timingSafeEqual(got, want);
}

export function sameToken(a: string | undefined, b: string | undefined): boolean {
  if (!a || !b) return false;
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** The anonymous token the browser sent back in its cookie, if any. */
export function anonymousCsrfCookieOf(req: Request): string | undefined {
  const header = req.headers.cookie;
  if (!header) return undefined;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === anonymousCsrfCookie) return part.slice(eq + 1).trim();
  }
  return undefined;
}

export function setAnonymousCsrfCookie(res: Response, token: string, secure: boolean): void {
  const options: CookieOptions = { httpOnly: true, sameSite: 'strict', secure, path: '/', maxAge: 12 * 3600_000 };
  res.cookie(anonymousCsrfCookie, token, options);
}

/**
 * Whether a browser sent the request: browsers add `Origin` to state-changing requests and `Sec-Fetch-Site`
 * to all of them. A client without either (a script, a server) carries no visitor's cookies to abuse.
 */
export const sentByBrowser = (req: Request) => req.get('origin') !== undefined || req.get('sec-fetch-site') !== undefined;
