import { availableParallelism } from 'node:os';
import { z } from 'zod';

const bool = z.enum(['true', 'false', '1', '0', 'yes', 'no']).transform((v) => v === 'true' || v === '1' || v === 'yes');

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
  /** Names this instance in an `X-Instance` header on every answer (several instances behind one load balancer). */
  INSTANCE_NAME: z.string().min(1).optional(),
  /** Migrate the schema before serving; safe when several instances start at once (the migrations take a lock). */
  MIGRATE_ON_START: bool.default(false),
  /** Server processes sharing the port on this machine; in production, one per core (up to four) unless set. */
  WEB_CONCURRENCY: z.coerce.number().int().min(1).max(64).optional(),
  /** Connections to PostgreSQL each server process keeps at most; by default about ten for the whole machine. */
  DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(200).optional(),
  /** Made-up reports each PDF render thread lays out at start before the first real one; by default 3 in production, 1 otherwise. */
  PDF_WARM_UP_ROUNDS: z.coerce.number().int().min(0).max(10).optional(),
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
  /** In production the payment SDK talks to the local fake only when this says so. */
  PAYMENTS_FAKE_IN_PRODUCTION: bool.default(false),
});

/** Development values that are public (they are in this repository): never accepted in production. */
export const developmentSecrets = {
  SESSION_SECRET: ['cellarwright-development-only-secret'],
  STRIPE_SECRET_KEY: ['sk_test_cellarwright_local'],
  STRIPE_WEBHOOK_SECRET: ['whsec_cellarwright_local'],
} as const;

/** What is wrong with the secrets a production start was given, one line per variable. */
function productionSecretProblems(source: Record<string, string | undefined>): string[] {
  const problems: string[] = [];
  for (const [name, known] of Object.entries(developmentSecrets)) {
    const value = source[name]?.trim();
    if (!value) problems.push(`  ${name}: required in production`);
    else if ((known as readonly string[]).includes(value))
      problems.push(`  ${name}: the development value is public and not accepted in production; set a real secret`);
  }
  return problems;
}

export type Env = z.infer<typeof envSchema>;

/** PDF_WARM_UP_ROUNDS in production when it is not set (the audit benchmark warms its threads as a production server does). */
export const productionPdfWarmUpRounds = 3;

export interface Config extends Env {
  isProduction: boolean;
  publicUrl: string;
  sessionSecret: string;
  cookieSecure: boolean;
  devMailbox: boolean;
  mailboxDatabaseUrl: string;
  /** How many server processes to run (WEB_CONCURRENCY, or one per core up to four in production, else one). */
  processes: number;
  /**
   * Connections each process keeps at most (DATABASE_POOL_SIZE, or ten shared by the processes, at least four
   * each): more connections than the database's cores can serve make every statement slower, not more of them.
   */
  poolSize: number;
  /** Made-up audits each PDF render thread lays out at start (PDF_WARM_UP_ROUNDS); 0 starts the threads on the first report. */
  pdfWarmUpRounds: number;
}

export function loadConfig(source: NodeJS.ProcessEnv | Record<string, string | undefined> = process.env): Config {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
    throw new Error(`Invalid environment:\n${lines}`);
  }
  const env = parsed.data;
  const isProduction = env.NODE_ENV === 'production';
  if (isProduction) {
    const problems = productionSecretProblems(source);
    if (env.STRIPE_API_HOST && /^(https?:\/\/)?(127\.|localhost|\[?::1\]?)/i.test(env.STRIPE_API_HOST) && !env.PAYMENTS_FAKE_IN_PRODUCTION) {
      problems.push('  STRIPE_API_HOST: points at this machine (the local fake); unset it, or set PAYMENTS_FAKE_IN_PRODUCTION=true to mean it');
    }
    if (problems.length) throw new Error(`Invalid environment:\n${problems.join('\n')}`);
  }
  // A production instance pays through the real provider unless told in so many words to use the fake.
  const processes = env.WEB_CONCURRENCY ?? (isProduction ? Math.min(availableParallelism(), 4) : 1);
  const fakePort = isProduction && !env.PAYMENTS_FAKE_IN_PRODUCTION ? undefined : env.PAYMENTS_FAKE_PORT;
  return {
    ...env,
    PAYMENTS_FAKE_PORT: fakePort,
    isProduction,
    publicUrl: (env.PUBLIC_URL ?? `http://127.0.0.1:${env.PORT}`).replace(/\/$/, ''),
    sessionSecret: env.SESSION_SECRET ?? developmentSecrets.SESSION_SECRET[0],
    cookieSecure: env.COOKIE_SECURE ?? isProduction,
    devMailbox: env.DEV_MAILBOX ?? !isProduction,
    mailboxDatabaseUrl: env.MAILBOX_DATABASE_URL ?? env.DATABASE_URL,
    processes,
    poolSize: env.DATABASE_POOL_SIZE ?? Math.max(4, Math.ceil(10 / processes)),
    pdfWarmUpRounds: env.PDF_WARM_UP_ROUNDS ?? (isProduction ? productionPdfWarmUpRounds : 1),
  };
}
