import bcrypt from 'bcrypt';
import crypto from 'node:crypto';
import request from 'supertest';
import { parseConfig } from '../../server/config/env';
import { createApp } from '../../server/app';
import { createSequelize } from '../../server/db/sequelize';
import { initModels, Program, ProgramMember, User } from '../../server/db/models';
import { createMailer } from '../../server/integrations/mailer';
import { createStorage } from '../../server/integrations/storage';
import { dispatchOutbox } from '../../server/services/outbox';
import type { Deps } from '../../server/deps';
import type { Role } from '../../shared/schemas/auth';

export const TEST_PASSWORD = 'correct-horse-battery';
let cachedHash: string | undefined;
let current: ReturnType<typeof createSequelize> | undefined;

/** A fresh app against the test database (set up by `npm test`); each call has its own rate-limit counters. */
export function makeTestApp(overrides: Record<string, string> = {}) {
  const config = parseConfig({ ...process.env, ...overrides });
  const sequelize = createSequelize(config.databaseUrl);
  initModels(sequelize);
  const deps: Deps = {
    config,
    sequelize,
    mailer: createMailer(config.mail.smtpUrl, config.mail.from),
    storage: createStorage(config.s3),
    log: () => undefined,
  };
  const { app, routes } = createApp(deps);
  const previous = current;
  current = sequelize;
  // Models are bound to one Sequelize at a time: closing a second app binds them back to the first.
  const close = async () => {
    deps.storage.close();
    await sequelize.close();
    current = previous;
    if (previous) initModels(previous);
  };
  return { app, routes, deps, sequelize, close };
}

export const uid = () => crypto.randomBytes(5).toString('hex');

export async function makeProgram(name = 'Test program') {
  return Program.create({ code: `T${uid().slice(0, 8).toUpperCase()}`, name });
}

export async function makeUser(opts: { role: Role; programIds?: string[]; active?: boolean; password?: string | null; email?: string }) {
  cachedHash ??= await bcrypt.hash(TEST_PASSWORD, 11);
  const user = await User.create({
    email: opts.email ?? `${opts.role}-${uid()}@test.example`,
    name: `Test ${opts.role} ${uid()}`,
    role: opts.role,
    passwordHash: opts.password === null ? null : opts.password ? await bcrypt.hash(opts.password, 11) : cachedHash,
    active: opts.active ?? true,
  });
  for (const programId of opts.programIds ?? []) await ProgramMember.create({ programId, userId: user.id });
  return user;
}

export async function signInAs(app: Parameters<typeof request>[0], email: string, password = TEST_PASSWORD) {
  const res = await request(app).post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in failed for ${email}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.token as string;
}

type Mail = { id: string; to: string; subject: string; text: string; date: string };

/** Delivers the outbox, then waits for a message to `to` in the SMTP fake. */
export async function waitForMail(deps: Deps, to: string, subjectIncludes: string, timeoutMs = 10_000): Promise<Mail> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    await dispatchOutbox(deps);
    const res = await fetch(`${process.env.DEV_INBOX_URL}/messages`);
    const { messages } = (await res.json()) as { messages: Mail[] };
    const found = messages.find((m) => m.to.includes(to) && m.subject.includes(subjectIncludes));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail to ${to} with subject containing "${subjectIncludes}"`);
}

export function linkToken(text: string): string {
  const match = /set-password\?token=([A-Za-z0-9_-]+)/.exec(text);
  if (!match) throw new Error('no set-password link in the mail');
  return match[1];
}

/**
 * Counts the SQL statements Sequelize sends while `work` runs, through its `logging` option (read
 * at each query, so every statement passes it; the type declarations leave `options` out).
 */
export async function countStatements(t: { sequelize: unknown }, work: () => Promise<unknown>): Promise<{ count: number; statements: string[] }> {
  const statements: string[] = [];
  const options = (t.sequelize as unknown as { options: { logging: unknown } }).options;
  const previous = options.logging;
  options.logging = (sql: string) => {
    statements.push(sql);
  };
  try {
    await work();
  } finally {
    options.logging = previous;
  }
  return { count: statements.length, statements };
}

/** The statements of one request, which must answer 200. */
export async function statementsOf(t: { sequelize: unknown }, send: () => Promise<request.Response>): Promise<number> {
  let status = 0;
  const { count } = await countStatements(t, async () => {
    status = (await send()).status;
  });
  expect(status).toBe(200);
  return count;
}
