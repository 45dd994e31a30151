import type { ColumnType, Generated } from 'kysely';
import type { Role } from '../../../shared/permissions/roles.ts';
import type { Json, Timestamp } from './types.ts';

export interface AppUserTable {
  id: Generated<string>;
  email: string;
  name: string;
  password_hash: string | null;
  roles: ColumnType<Role[], Role[] | undefined, Role[]>;
  is_active: Generated<boolean>;
  units: Generated<'metric' | 'us'>;
  last_login_at: Date | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface UserTokenTable {
  id: Generated<string>;
  user_id: string;
  purpose: 'invitation' | 'password_reset' | 'account_unlock';
  token_hash: string;
  expires_at: Timestamp;
  used_at: Date | null;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface SessionTable {
  sid: string;
  sess: Json;
  expire: Timestamp;
}

export interface RateLimitTable {
  key: string;
  hits: number;
  reset_at: Timestamp;
}

export interface AuditLogTable {
  id: Generated<string>;
  actor_id: string | null;
  action: string;
  subject_type: string;
  subject_id: string | null;
  detail: Json;
  at: Generated<Date>;
}

export interface SettingTable {
  key: string;
  value: Json;
  updated_by: string | null;
  updated_at: Generated<Date>;
}

export interface SeedRunTable {
  name: string;
  ran_at: Generated<Date>;
}

export interface DevMailMessageTable {
  id: Generated<string>;
  mail_from: string;
  mail_to: string[];
  subject: string;
  text_body: string;
  html_body: string | null;
  raw: string;
  received_at: Generated<Date>;
}

export interface AccountTables {
  app_user: AppUserTable;
  user_token: UserTokenTable;
  session: SessionTable;
  rate_limit: RateLimitTable;
  audit_log: AuditLogTable;
  setting: SettingTable;
  seed_run: SeedRunTable;
  dev_mail_message: DevMailMessageTable;
}
