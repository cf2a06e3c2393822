import { createHash } from 'node:crypto';
import { z } from 'zod';

/** Every production setting comes from the environment; see .env.example. */
const Env = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  PORT: z.coerce.number().int().default(3000),
  HOST: z.string().default('127.0.0.1'),
  PUBLIC_URL: z.url().default('http://127.0.0.1:3000'),
  DATABASE_URL: z.string().min(1),
  REDIS_URL: z.string().min(1).default('redis://127.0.0.1:6379'),
  SESSION_SECRET: z.string().min(16, 'SESSION_SECRET must be at least 16 characters'),
  GOOGLE_CLIENT_ID: z.string().min(1),
  GOOGLE_CLIENT_SECRET: z.string().min(1),
  // Left unset in production (Google's own endpoints); set to the local fake provider otherwise.
  OAUTH_AUTHORIZATION_URL: z.url().optional(),
  OAUTH_TOKEN_URL: z.url().optional(),
  OAUTH_USERINFO_URL: z.url().optional(),
  SMTP_URL: z.string().default('smtp://127.0.0.1:2525'),
  MAIL_FROM: z.string().default('Waterline <no-reply@waterline.invalid>'),
  S3_ENDPOINT: z.string().optional(),
  S3_BUCKET: z.string().default('waterline'),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  FULLCALENDAR_LICENSE_KEY: z.string().default('GPL-My-Project-Is-Open-Source'),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  SIGN_IN_RATE_LIMIT: z.coerce.number().int().min(1).default(30),
  // Signs the answer, invitation and feed links in e-mails; required in production (see loadConfig).
  LINK_SECRET: z.string().min(32, 'LINK_SECRET must be at least 32 characters').optional(),
  // A request to a partner unanswered this long is flagged overdue and gets one reminder.
  REMINDER_HOURS: z.coerce.number().min(1).default(48),
  // The BullMQ queue the outbox relay feeds and the mail worker drains.
  MAIL_QUEUE: z.string().regex(/^[\w-]+$/).default('mail'),
});
export type Config = z.infer<typeof Env> & { LINK_SECRET: string };

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = Env.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Waterline's settings are incomplete:\n${lines.join('\n')}`);
  }
  const { LINK_SECRET, ...rest } = parsed.data;
  if (!LINK_SECRET && rest.NODE_ENV === 'production') {
    throw new Error("Waterline's settings are incomplete:\n  LINK_SECRET: is required in production");
  }
  // Outside production a link secret derived from the session secret keeps local set-up to one setting.
  return { ...rest, LINK_SECRET: LINK_SECRET ?? createHash('sha256').update(`waterline-links:${rest.SESSION_SECRET}`).digest('base64url') };
}
