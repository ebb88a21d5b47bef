import crypto from 'node:crypto';
import bcrypt from 'bcrypt';
import { Op, type Transaction } from 'sequelize';
import { AuthLink, Program, User } from '../db/models';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { signToken } from '../middleware/auth';
import { enqueueMail } from './outbox';
import type { User as UserDto, Program as ProgramDto } from '../../shared/schemas/auth';

export const INVITE_TTL_MS = 7 * 24 * 3600 * 1000;
export const RESET_TTL_MS = 60 * 60 * 1000;

// A hash to compare against when the e-mail is unknown, so both paths take about as long.
let decoyHash: string | undefined;

export const toUserDto = (u: User): UserDto => ({ id: u.id, email: u.email, name: u.name, role: u.role, active: u.active });
export const toProgramDto = (p: Program): ProgramDto => ({ id: p.id, code: p.code, name: p.name });

export async function hashPassword(deps: Deps, password: string) {
  return bcrypt.hash(password, deps.config.bcryptRounds);
}

export async function signIn(deps: Deps, email: string, password: string) {
  const user = await User.findOne({ where: { email } });
  if (!user || !user.passwordHash || !user.active) {
    decoyHash ??= await bcrypt.hash('decoy-password', deps.config.bcryptRounds);
    await bcrypt.compare(password, decoyHash);
    throw new AppError(401, 'auth/invalid-credentials', 'That e-mail and password do not match an account.');
  }
  if (!(await bcrypt.compare(password, user.passwordHash))) {
    throw new AppError(401, 'auth/invalid-credentials', 'That e-mail and password do not match an account.');
  }
  return { token: signToken(deps, user), user: toUserDto(user) };
}

const hashToken = (token: string) => crypto.createHash('sha256').update(token).digest('hex');

/** Creates a one-time link and queues its e-mail, in the caller's transaction. */
export async function sendAuthLink(
  deps: Deps,
  user: User,
  purpose: 'invite' | 'reset',
  transaction: Transaction,
  invitedBy?: string,
) {
  const token = crypto.randomBytes(32).toString('base64url');
  const ttl = purpose === 'invite' ? INVITE_TTL_MS : RESET_TTL_MS;
  await AuthLink.create(
    { userId: user.id, purpose, tokenHash: hashToken(token), expiresAt: new Date(Date.now() + ttl), usedAt: null },
    { transaction },
  );
  const link = `${deps.config.publicUrl}/set-password?token=${token}`;
  const text =
    purpose === 'invite'
      ? `Hello ${user.name},\n\n${invitedBy ?? 'An administrator'} invited you to Proofyard, where your program tracks its prototype assets, findings and gate readiness.\n\nSet your password and sign in (the link works once and expires in 7 days):\n${link}\n\nYour e-mail for signing in: ${user.email}\n`
      : `Hello ${user.name},\n\nSomeone asked to reset the Proofyard password for ${user.email}. If that was you, choose a new password here (the link works once and expires in 1 hour):\n${link}\n\nIf it was not you, ignore this message; your password stays as it is.\n`;
  await enqueueMail(
    {
      to: user.email,
      subject: purpose === 'invite' ? 'You are invited to Proofyard' : 'Reset your Proofyard password',
      text,
      kind: purpose,
    },
    transaction,
  );
  return token;
}

export async function forgotPassword(deps: Deps, email: string) {
  await deps.sequelize.transaction(async (transaction) => {
    const user = await User.findOne({ where: { email, active: true }, transaction });
    if (user) await sendAuthLink(deps, user, 'reset', transaction);
  });
}

export async function setPasswordFromLink(deps: Deps, token: string, password: string) {
  const passwordHash = await hashPassword(deps, password);
  return deps.sequelize.transaction(async (transaction) => {
    const link = await AuthLink.findOne({
      where: { tokenHash: hashToken(token), usedAt: null, expiresAt: { [Op.gt]: new Date() } },
      lock: transaction.LOCK.UPDATE,
      transaction,
    });
    const user = link ? await User.findByPk(link.userId, { transaction }) : null;
    if (!link || !user || !user.active) {
      throw new AppError(400, 'auth/link-invalid', 'This link has expired or was already used. Ask for a new one.');
    }
    link.usedAt = new Date();
    await link.save({ transaction });
    // Every other open link of this user stops working too, and older sessions end.
    await AuthLink.update({ usedAt: new Date() }, { where: { userId: user.id, usedAt: null }, transaction });
    user.passwordHash = passwordHash;
    user.tokenVersion += 1;
    await user.save({ transaction });
    return { token: signToken(deps, user), user: toUserDto(user) };
  });
}

export async function programsOf(userId: string) {
  const programs = await Program.findAll({
    include: [],
    where: { id: { [Op.in]: Program.sequelize!.literal(`(SELECT program_id FROM program_members WHERE user_id = ${Program.sequelize!.escape(userId)})`) } },
    order: [['code', 'ASC']],
  });
  return programs.map(toProgramDto);
}
