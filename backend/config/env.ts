import { z } from 'zod';

const bool = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required'),
  /** Where the development SMTP fake keeps its mailbox; defaults to DATABASE_URL. */
  MAILBOX_DATABASE_URL: z.string().optional(),
  SESSION_SECRET: z.string().min(16).optional(),
  PUBLIC_URL: z.string().url().optional(),
  COOKIE_SECURE: bool.optional(),
  TRUST_PROXY: z.string().optional(),
  SMTP_HOST: z.string().default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().default(2525),
  SMTP_SECURE: bool.default(false),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default('Larkspur Yard Brewing Co-op <cellar@example.org>'),
  DEV_MAILBOX: bool.optional(),
  WORKERS: bool.default(true),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).optional(),
  LOGIN_LIMIT_PER_IP: z.coerce.number().int().positive().default(100),
  LOGIN_LIMIT_PER_ACCOUNT: z.coerce.number().int().positive().default(10),
  LOGIN_LIMIT_WINDOW_MINUTES: z.coerce.number().int().positive().default(15),
  LOGIN_LOCK_PER_ACCOUNT: z.coerce.number().int().positive().default(100),
  LOGIN_LOCK_WINDOW_MINUTES: z.coerce.number().int().positive().default(60),
  PAYMENTS_FAKE_PORT: z.coerce.number().int().optional(),
  STRIPE_SECRET_KEY: z.string().default('sk_test_cellarwright_local'),
  STRIPE_WEBHOOK_SECRET: z.string().default('whsec_cellarwright_local'),
  STRIPE_API_HOST: z.string().optional(),
});

export type Env = z.infer<typeof envSchema>;

export interface Config extends Env {
  isProduction: boolean;
  publicUrl: string;
  sessionSecret: string;
  cookieSecure: boolean;
  devMailbox: boolean;
  mailboxDatabaseUrl: string;
}

export function loadConfig(source: NodeJS.ProcessEnv | Record<string, string | undefined> = process.env): Config {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
    throw new Error(`Invalid environment:\n${lines}`);
  }
  const env = parsed.data;
  const isProduction = env.NODE_ENV === 'production';
  if (isProduction && !env.SESSION_SECRET) throw new Error('Invalid environment:\n  SESSION_SECRET: required in production');
  return {
    ...env,
    isProduction,
    publicUrl: (env.PUBLIC_URL ?? `http://127.0.0.1:${env.PORT}`).replace(/\/$/, ''),
    sessionSecret: env.SESSION_SECRET ?? 'cellarwright-development-only-secret',
    cookieSecure: env.COOKIE_SECURE ?? isProduction,
    devMailbox: env.DEV_MAILBOX ?? !isProduction,
    mailboxDatabaseUrl: env.MAILBOX_DATABASE_URL ?? env.DATABASE_URL,
  };
}
