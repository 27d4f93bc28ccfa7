import path from 'node:path';
import { z } from 'zod';

// The only reader of process.env in the project.
const Env = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().default('0.0.0.0'),
  DATABASE_FILE: z.string().default(path.join('data', 'yieldpoint.db')),
  SESSION_SECRET: z.string().min(32).optional(),
  COOKIE_SECURE: z.enum(['0', '1']).default('0'),
  SESSION_IDLE_MINUTES: z.coerce.number().positive().default(12 * 60),
  SESSION_ABSOLUTE_HOURS: z.coerce.number().positive().default(7 * 24),
  WEB_DIR: z.string().default('dist'),
  SKIP_WEB_BUILD: z.enum(['0', '1']).default('0'),
  SEED_DEMO: z.enum(['0', '1']).default('1'),
  LOG_REQUESTS: z.enum(['0', '1']).default('0'),
  API_PORT: z.coerce.number().int().default(8080),
});

export type ServerEnv = {
  port: number;
  host: string;
  databaseFile: string;
  sessionSecret: Uint8Array | null;
  cookieSecure: boolean;
  sessionIdleMinutes: number;
  sessionAbsoluteHours: number;
  webDir: string;
  skipWebBuild: boolean;
  seedDemo: boolean;
  apiPort: number;
};

/** Reads and validates the environment once; a bad value stops the process with the variable's name. */
export function readEnv(source: NodeJS.ProcessEnv = process.env): ServerEnv {
  const parsed = Env.safeParse(source);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new Error(`Environment variable ${issue.path.join('.')}: ${issue.message}`);
  }
  const e = parsed.data;
  return {
    port: e.PORT,
    host: e.HOST,
    databaseFile: e.DATABASE_FILE,
    sessionSecret: e.SESSION_SECRET ? new TextEncoder().encode(e.SESSION_SECRET) : null,
    cookieSecure: e.COOKIE_SECURE === '1',
    sessionIdleMinutes: e.SESSION_IDLE_MINUTES,
    sessionAbsoluteHours: e.SESSION_ABSOLUTE_HOURS,
    webDir: e.WEB_DIR,
    skipWebBuild: e.SKIP_WEB_BUILD === '1',
    seedDemo: e.SEED_DEMO === '1',
    apiPort: e.API_PORT,
  };
}
