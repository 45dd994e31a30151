import connectPgSimple from 'connect-pg-simple';
import type { Request } from 'express';
import session, { type Session, type SessionData } from 'express-session';
import type { Role } from '../../../shared/permissions/roles.ts';
import type { Deps } from '../../lib/deps.ts';
import { toSessionUser, type SessionUser } from './auth.service.ts';

const PgStore = connectPgSimple(session);

/**
 * How often a session's expiry is written back at most. The cookie's expiry moves on with every answer
 * (rolling sessions); the row's only once this much of it has passed, so a signed-in person's reads
 * write nothing. A row may therefore end up to this long before its cookie would have.
 */
export const SESSION_TOUCH_EVERY_MS = 60_000;

/** What the session's one read found besides the session: its person (null when gone or inactive) and the row's expiry. */
interface Loaded {
  account: SessionUser | null;
  expireMs: number;
}

interface SessionRow {
  sess: SessionData;
  expire_ms: number;
  id: string | null;
  email: string;
  name: string;
  roles: Role[];
  units: 'metric' | 'us';
}

// The session and its person in one statement: the person only while active, so a deactivated
// person's session ends on their next request (authenticate destroys it), whatever instance serves it.
const readSession = `
  select s.sess, extract(epoch from s.expire::timestamptz)::float8 * 1000 as expire_ms,
         u.id, u.email, u.name, u.roles, u.units
  from session s
  left join app_user u on u.id = (s.sess->>'userId')::uuid and u.is_active
  where s.sid = $1 and s.expire >= to_timestamp($2)`;

/**
 * The session read, as a statement prepared once per connection (every signed-in request runs it, so
 * PostgreSQL parses and plans it once, not each time). A plan a migration has since made stale, or a
 * connection pooler in front of PostgreSQL that lost or mixed up prepared statements, means one more read,
 * unprepared.
 */
export function readSessionRow(pool: Deps['pool'], values: [string, number]) {
  return pool.query<SessionRow>({ name: 'cw-read-session', text: readSession, values }).catch((err: { code?: string }) => {
    if (err.code === '0A000' || err.code === '26000' || err.code === '42P05') return pool.query<SessionRow>(readSession, values);
    throw err;
  });
}

// Kept beside the objects they describe, never in them, so nothing of it is saved with the session.
const loadedRows = new WeakMap<object, Loaded>();
const loadedSessions = new WeakMap<object, Loaded>();

/**
 * Sessions live in PostgreSQL (`session`), shared by every instance. Only signed-in people have one
 * (anonymous CSRF tokens need none). Reading a session reads its person with it; writing back an
 * unchanged session happens at most every `SESSION_TOUCH_EVERY_MS`. Each instance deletes expired rows
 * every 15 minutes or so (the store spreads instances apart); tests only switch that timer off, and can
 * call `pruneSessions` themselves.
 */
class SessionStore extends PgStore {
  readonly #pool: Deps['pool'];

  constructor(pool: Deps['pool'], options: ConstructorParameters<typeof PgStore>[0]) {
    super(options);
    this.#pool = pool;
  }

  override get(sid: string, callback: (err: unknown, session?: SessionData | null) => void): void {
    readSessionRow(this.#pool, [sid, Date.now() / 1000]).then(
      ({ rows: [row] }) => {
        if (!row) return callback(null, null);
        loadedRows.set(row.sess, { account: row.id ? toSessionUser({ ...row, id: row.id }) : null, expireMs: row.expire_ms });
        callback(null, row.sess);
      },
      (err: unknown) => callback(err),
    );
  }

  override createSession(req: Request, data: SessionData): Session & SessionData {
    const loaded = loadedRows.get(data);
    const created = super.createSession(req, data);
    if (loaded) loadedSessions.set(created, loaded);
    return created;
  }

  override touch(sid: string, data: SessionData, callback?: (err?: unknown) => void): void {
    const loaded = loadedSessions.get(data);
    const expires = data.cookie.expires;
    if (loaded && expires && expires.getTime() - loaded.expireMs < SESSION_TOUCH_EVERY_MS) return callback?.();
    super.touch(sid, data, callback);
  }
}

/**
 * The person the store read with this request's session: null when the account is gone or inactive,
 * undefined when the session was not read this way (a session begun during this request).
 */
export const sessionAccount = (s: Session | undefined): SessionUser | null | undefined => (s ? loadedSessions.get(s)?.account : undefined);

export const sessionStore = ({ pool, config }: Pick<Deps, 'pool' | 'config'>) =>
  new SessionStore(pool, { pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: config.NODE_ENV === 'test' ? false : 15 * 60 });
