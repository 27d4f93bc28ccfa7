import path from 'node:path';
import { z } from 'zod';

// The only reader of process.env in the project.
const Env = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().default('0.0.0.0'),
  DATABASE_FILE: z.string().default(path.join('data', 'yieldpoint.db')),
  // postgres://…: run on PostgreSQL instead of the SQLite file (README, Multi-site on PostgreSQL).
  DATABASE_URL: z
    .string()
    .regex(/^postgres(ql)?:\/\//, 'must be a postgres:// URL')
    .optional(),
  // The installation's own files (secrets, audit checkpoints, certificates, mail sink): beside the SQLite file by default.
  DATA_DIR: z.string().optional(),
  // PostgreSQL connections this process keeps open.
  DATABASE_POOL: z.coerce.number().int().min(1).max(200).default(10),
  SESSION_SECRET: z.string().min(32).optional(),
  // Unset: Secure when PUBLIC_URL is https (a browser then never sends the session cookie over plain http).
  COOKIE_SECURE: z.enum(['0', '1']).optional(),
  SESSION_IDLE_MINUTES: z.coerce
    .number()
    .positive()
    .default(12 * 60),
  SESSION_ABSOLUTE_HOURS: z.coerce
    .number()
    .positive()
    .default(7 * 24),
  AUDIT_CHECKPOINT_MINUTES: z.coerce.number().positive().default(15),
  WEB_DIR: z.string().default('dist'),
  SKIP_WEB_BUILD: z.enum(['0', '1']).default('0'),
  // plain: serve Expo's export without the build's rewrites (server/web-build/build.ts), the off switch after an upgrade.
  WEB_PIPELINE: z.enum(['finished', 'plain']).default('finished'),
  SEED_DEMO: z.enum(['0', '1']).default('1'),
  LOG_REQUESTS: z.enum(['0', '1']).default('0'),
  API_PORT: z.coerce.number().int().default(8080),
  // Base of links in e-mails and payment return pages; default http://<host>:<port> of this server.
  PUBLIC_URL: z.string().url().optional(),
  // Mail: a real relay when SMTP_HOST is set, else a local sink started with the app (0: any free port).
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(587),
  SMTP_SECURE: z.enum(['0', '1']).default('0'),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default('Yieldpoint <no-reply@yieldpoint.local>'),
  SMTP_SINK_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  MAIL_SINK_DIR: z.string().optional(),
  // Billing: real Stripe when STRIPE_SECRET_KEY is set, else the local fake (0: any free port).
  STRIPE_SECRET_KEY: z.string().optional(),
  STRIPE_WEBHOOK_SECRET: z.string().optional(),
  STRIPE_FAKE_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  // The simulated OPC UA plant (127.0.0.1): auto starts it beside the app unless a vessel reads a real source.
  PLANT_SIM: z.enum(['auto', '0']).default('auto'),
  // 4840 is OPC UA's registered port; taken, the plant takes a free one.
  PLANT_SIM_PORT: z.coerce.number().int().min(0).max(65535).default(4840),
});

export type MailEnv =
  | { mode: 'smtp'; host: string; port: number; secure: boolean; user?: string; pass?: string; from: string }
  | { mode: 'sink'; sinkPort: number; sinkDir: string; from: string };

export type BillingEnv = { mode: 'stripe'; secretKey: string; webhookSecret: string } | { mode: 'fake'; fakePort: number };

export type ServerEnv = {
  port: number;
  host: string;
  databaseFile: string;
  /** PostgreSQL when set; else the SQLite file. */
  databaseUrl: string | null;
  databasePool: number;
  /** The folder of the installation's own files: DATA_DIR, else the SQLite file's folder (`data` on PostgreSQL). */
  dataDir: string;
  sessionSecret: Uint8Array | null;
  cookieSecure: boolean;
  sessionIdleMinutes: number;
  sessionAbsoluteHours: number;
  auditCheckpointMinutes: number;
  webDir: string;
  skipWebBuild: boolean;
  webPipeline: 'finished' | 'plain';
  seedDemo: boolean;
  apiPort: number;
  publicUrl: string | null;
  mail: MailEnv;
  billing: BillingEnv;
  plantSim: { enabled: boolean; port: number };
};

/** Reads and validates the environment once; a bad value stops the process with the variable's name. */
export function readEnv(source: NodeJS.ProcessEnv = process.env): ServerEnv {
  const parsed = Env.safeParse(source);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new Error(`Environment variable ${issue.path.join('.')}: ${issue.message}`);
  }
  const e = parsed.data;
  const dataDir = path.resolve(e.DATA_DIR ?? (e.DATABASE_URL ? 'data' : path.dirname(e.DATABASE_FILE)));
  return {
    port: e.PORT,
    host: e.HOST,
    databaseFile: e.DATABASE_FILE,
    databaseUrl: e.DATABASE_URL ?? null,
    databasePool: e.DATABASE_POOL,
    dataDir,
    sessionSecret: e.SESSION_SECRET ? new TextEncoder().encode(e.SESSION_SECRET) : null,
    cookieSecure: e.COOKIE_SECURE ? e.COOKIE_SECURE === '1' : (e.PUBLIC_URL?.startsWith('https:') ?? false),
    sessionIdleMinutes: e.SESSION_IDLE_MINUTES,
    sessionAbsoluteHours: e.SESSION_ABSOLUTE_HOURS,
    auditCheckpointMinutes: e.AUDIT_CHECKPOINT_MINUTES,
    webDir: e.WEB_DIR,
    skipWebBuild: e.SKIP_WEB_BUILD === '1',
    webPipeline: e.WEB_PIPELINE,
    seedDemo: e.SEED_DEMO === '1',
    apiPort: e.API_PORT,
    publicUrl: e.PUBLIC_URL ?? null,
    mail: e.SMTP_HOST
      ? { mode: 'smtp', host: e.SMTP_HOST, port: e.SMTP_PORT, secure: e.SMTP_SECURE === '1', user: e.SMTP_USER, pass: e.SMTP_PASS, from: e.MAIL_FROM }
      : { mode: 'sink', sinkPort: e.SMTP_SINK_PORT, sinkDir: e.MAIL_SINK_DIR ?? path.join(dataDir, 'mail-sink'), from: e.MAIL_FROM },
    billing: billingEnv(e.STRIPE_SECRET_KEY, e.STRIPE_WEBHOOK_SECRET, e.STRIPE_FAKE_PORT),
    plantSim: { enabled: e.PLANT_SIM === 'auto', port: e.PLANT_SIM_PORT },
  };
}

function billingEnv(secretKey: string | undefined, webhookSecret: string | undefined, fakePort: number): BillingEnv {
  if (!secretKey) return { mode: 'fake', fakePort };
  if (!webhookSecret) throw new Error('Environment variable STRIPE_WEBHOOK_SECRET: required when STRIPE_SECRET_KEY is set');
  return { mode: 'stripe', secretKey, webhookSecret };
}
