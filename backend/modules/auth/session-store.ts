import connectPgSimple from 'connect-pg-simple';
import session from 'express-session';
import type { Deps } from '../../lib/deps.ts';

const PgStore = connectPgSimple(session);

/**
 * Sessions live in PostgreSQL (`session`), shared by every instance. Only signed-in people have one
 * (anonymous CSRF tokens need none). Each instance deletes expired rows every 15 minutes or so (the store
 * spreads instances apart); tests only switch that timer off, and can call `pruneSessions` themselves.
 */
export const sessionStore = ({ pool, config }: Pick<Deps, 'pool' | 'config'>) =>
  new PgStore({ pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: config.NODE_ENV === 'test' ? false : 15 * 60 });
