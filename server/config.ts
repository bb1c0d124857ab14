import path from 'node:path';
import { z } from 'zod';

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  DATABASE_PATH: z.string().min(1).default(path.join('data', 'cristae.sqlite')),
  APP_ORIGIN: z.string().optional(),
  DEMO_PASSWORD: z.string().min(8).default('cristae-demo'),
  SESSION_SECRET: z.string().min(16).optional(),
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: z.coerce.number().int().optional(),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default('Cristae <no-reply@cristae.invalid>'),
  LOCAL_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(2525),
  FILES_PATH: z.string().optional(),
});

export type AppConfig = {
  env: 'development' | 'test' | 'production';
  port: number;
  databasePath: string;
  filesPath: string;
  /** Origins allowed to make state-changing requests (the CSRF defence compares against these). */
  allowedOrigins: string[];
  /** The origin used in links inside e-mails. */
  publicOrigin: string;
  demoPassword: string;
  sessionSecret: string;
  mail: {
    from: string;
    smtp: { host: string; port: number; user?: string; pass?: string } | null;
    localSmtpPort: number;
  };
};

/** Reads the environment once and fails at start-up with the offending variable named. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid environment: ${lines.join('; ')}`);
  }
  const e = parsed.data;
  const defaults = [`http://localhost:${e.PORT}`, `http://127.0.0.1:${e.PORT}`];
  const extra = (e.APP_ORIGIN ?? '')
    .split(',')
    .map((s) => s.trim().replace(/\/$/, ''))
    .filter(Boolean);
  const allowedOrigins = [...new Set([...defaults, ...extra])];
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    databasePath: e.DATABASE_PATH,
    filesPath: e.FILES_PATH ?? path.join(path.dirname(e.DATABASE_PATH), 'files'),
    allowedOrigins,
    publicOrigin: extra[0] ?? defaults[0]!,
    demoPassword: e.DEMO_PASSWORD,
    sessionSecret: e.SESSION_SECRET ?? 'cristae-local-session-secret-change-me',
    mail: {
      from: e.MAIL_FROM,
      smtp: e.SMTP_HOST
        ? { host: e.SMTP_HOST, port: e.SMTP_PORT ?? 587, user: e.SMTP_USER, pass: e.SMTP_PASS }
        : null,
      localSmtpPort: e.LOCAL_SMTP_PORT,
    },
  };
}
