import type { AppAbility } from '../../shared/permissions/ability.ts';
import type { SessionUser } from '../modules/auth/auth.service.ts';

declare module 'express-serve-static-core' {
  interface Request {
    /** The signed-in person, or null. */
    user: SessionUser | null;
    /** What that person may do; built per request from shared/permissions. */
    ability: AppAbility;
  }
}

declare module 'express-session' {
  interface SessionData {
    userId?: string;
    csrfToken?: string;
  }
}
export {};
