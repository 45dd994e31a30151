import { Router, type Request, type Response } from 'express';
import { rateLimit, type Options } from 'express-rate-limit';
import {
  acceptInvitationSchema,
  loginSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  unlockAccountSchema,
  updateMeSchema,
} from '../../../shared/schemas/auth.ts';
import type { Deps } from '../../lib/deps.ts';
import { HttpProblem, unauthorized } from '../../lib/http-problem.ts';
import { PgRateLimitStore } from '../../lib/rate-limit-store.ts';
import { coopTimeZone } from '../settings/settings.service.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { acceptInvitation, recordSignIn, requestPasswordReset, resetPassword, sendUnlockLink, unlockAccount, updateMe } from './account.service.ts';
import { checkCredentials, peekToken, toSessionUser, type SessionUser } from './auth.service.ts';
import { anonymousCsrfCookieOf, csrfKey, isValidAnonymousCsrfToken, issueAnonymousCsrfToken, newSessionCsrfToken, setAnonymousCsrfCookie } from './csrf.ts';
import { clientAddressKey, LoginThrottle, type LoginRefusal } from './login-throttle.ts';

/** Start a fresh session for `user`: a new id (no fixation), the CSRF token carried over. */
function signIn(req: Request, user: SessionUser): Promise<void> {
  const csrf = req.session.csrfToken ?? newSessionCsrfToken();
  return new Promise((resolve, reject) => {
    req.session.regenerate((err) => {
      if (err) return reject(err as Error);
      req.session.userId = user.id;
      req.session.csrfToken = csrf;
      req.session.save((e) => (e ? reject(e as Error) : resolve()));
    });
  });
}

export function authRoutes({ db, config, queue, clock }: Deps): Router {
  const router = Router();
  const windowMs = config.LOGIN_LIMIT_WINDOW_MINUTES * 60_000;
  const throttle = new LoginThrottle(db, config);
  const anonymousCsrf = csrfKey(config.sessionSecret);
  const tooMany =
    (what: string): Options['handler'] =>
    (req, res) => {
      const reset = (req as typeof req & { rateLimit?: { resetTime?: Date } }).rateLimit?.resetTime;
      const seconds = reset ? Math.max(1, Math.ceil((reset.getTime() - Date.now()) / 1000)) : Math.ceil(windowMs / 1000);
      res.setHeader('Retry-After', String(seconds));
      res
        .status(429)
        .type('application/problem+json')
        .json({
          type: 'about:blank',
          status: 429,
          title: 'Too many attempts',
          detail: `Too many sign-in attempts ${what}; try again in ${Math.ceil(seconds / 60)} minutes.`,
        });
    };

  const perIp = rateLimit({
    windowMs,
    limit: config.LOGIN_LIMIT_PER_IP,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => clientAddressKey(req.ip),
    validate: { keyGeneratorIpFallback: false }, // clientAddressKey groups IPv6 addresses itself
    store: new PgRateLimitStore(db, 'login-ip:'),
    handler: tooMany('from this address'),
  });
  const refuse = (res: Response, refusal: LoginRefusal) => {
    const minutes = Math.ceil(refusal.retryAfterSeconds / 60);
    const wait = `${minutes} minute${minutes === 1 ? '' : 's'}`;
    const [title, detail] =
      refusal.reason === 'locked'
        ? [
            'Account locked',
            `Sign-in to this account is locked after many failed attempts; its owner has been e-mailed a link to unlock it. Otherwise try again in ${wait}.`,
          ]
        : ['Too many attempts', `Too many sign-in attempts for this account from this address; try again in ${wait}.`];
    res.setHeader('Retry-After', String(refusal.retryAfterSeconds));
    res.status(429).type('application/problem+json').json({ type: 'about:blank', status: 429, title, detail });
  };

  // Signed in: the token kept in the session. Anonymous: a signed token in a cookie, and no session row.
  router.get('/csrf', (req, res) => {
    if (req.session?.userId) {
      req.session.csrfToken ??= newSessionCsrfToken();
      return res.json({ token: req.session.csrfToken });
    }
    let token = anonymousCsrfCookieOf(req);
    if (!isValidAnonymousCsrfToken(anonymousCsrf, token)) {
      token = issueAnonymousCsrfToken(anonymousCsrf);
      setAnonymousCsrfCookie(res, token, config.cookieSecure);
    }
    res.json({ token });
  });

  router.post('/login', perIp, async (req, res) => {
    const input = loginSchema.parse(req.body ?? {});
    const refusal = await throttle.admit(input.email, req.ip);
    if (refusal) return refuse(res, refusal);
    const row = await checkCredentials(db, input.email, input.password);
    if (!row) {
      if (await throttle.failed(input.email)) await sendUnlockLink({ db, config, queue }, input.email, clock.now());
      throw new HttpProblem(401, 'Sign-in failed', 'E-mail or password is wrong.');
    }
    await throttle.succeeded(input.email, req.ip);
    const user = toSessionUser(row);
    await signIn(req, user);
    await recordSignIn(db, user.id, clock.now());
    res.json({ user });
  });

  router.post('/logout', requireUser, async (req, res) => {
    await new Promise<void>((resolve, reject) => req.session.destroy((err) => (err ? reject(err as Error) : resolve())));
    res.clearCookie('cw.sid', { path: '/' });
    res.status(204).end();
  });

  router.get('/me', async (req, res) => {
    if (!req.user) throw unauthorized();
    // The co-op's time zone rides along so that every screen shows times as the co-op reads them.
    res.json({ user: req.user, coop: { timeZone: await coopTimeZone(db) } });
  });

  router.patch('/me', requireUser, async (req, res) => {
    const input = updateMeSchema.parse(req.body ?? {});
    res.json({ user: await updateMe(db, userOf(req).id, input, clock.now()) });
  });

  router.post('/password-reset', perIp, async (req, res) => {
    const { email } = passwordResetRequestSchema.parse(req.body ?? {});
    await requestPasswordReset({ db, config, queue }, email, clock.now());
    // The same answer whether or not the account exists.
    res.status(202).json({ ok: true });
  });

  router.post('/password-reset/confirm', async (req, res) => {
    const input = passwordResetConfirmSchema.parse(req.body ?? {});
    await resetPassword(db, throttle, input, clock.now());
    res.status(204).end();
  });

  router.post('/unlock', async (req, res) => {
    const { token } = unlockAccountSchema.parse(req.body ?? {});
    await unlockAccount(db, throttle, token, clock.now());
    res.status(204).end();
  });

  router.get('/invitations/:token', async (req, res) => {
    const tok = await peekToken(db, req.params.token, 'invitation', clock.now());
    res.json({ email: tok.email, name: tok.name });
  });

  router.post('/invitations/accept', async (req, res) => {
    const input = acceptInvitationSchema.parse(req.body ?? {});
    const user = await acceptInvitation(db, input, clock.now());
    await signIn(req, user);
    res.json({ user });
  });

  return router;
}
