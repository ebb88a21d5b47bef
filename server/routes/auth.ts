import type { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { ForgotPasswordSchema, SetPasswordSchema, SignInSchema } from '../../shared/schemas/auth';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import { forgotPassword, programsOf, setPasswordFromLink, signIn, toUserDto } from '../services/auth';
import { User } from '../db/models';

function tooMany() {
  return new AppError(429, 'auth/too-many-attempts', 'Too many failed sign-ins. Wait a few minutes and try again.');
}

export function authRoutes(router: Router, deps: Deps, table: RouteTable) {
  const { windowMs, maxFailsPerClient, maxFailsPerEmail } = deps.config.signIn;
  // Failed sign-ins are counted per client address and per e-mail address; successes do not count.
  const perClient = rateLimit({
    windowMs,
    limit: maxFailsPerClient,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(tooMany()),
  });
  const perEmail = rateLimit({
    windowMs,
    limit: maxFailsPerEmail,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => `email:${String(req.body?.email ?? '').trim().toLowerCase()}`,
    handler: (_req, _res, next) => next(tooMany()),
  });
  const resetLimit = rateLimit({ windowMs: 15 * 60_000, limit: 20, handler: (_req, _res, next) => next(tooMany()) });

  table.add({ method: 'post', path: '/auth/sign-in', access: 'public' }, perClient, perEmail, async (req, res) => {
    const body = SignInSchema.parse(req.body);
    res.json(await signIn(deps, body.email, body.password));
  });

  table.add({ method: 'post', path: '/auth/forgot-password', access: 'public' }, resetLimit, async (req, res) => {
    const body = ForgotPasswordSchema.parse(req.body);
    await forgotPassword(deps, body.email);
    res.status(202).json({ message: 'If that address has an account, we sent a link.' });
  });

  table.add({ method: 'post', path: '/auth/set-password', access: 'public' }, resetLimit, async (req, res) => {
    const body = SetPasswordSchema.parse(req.body);
    res.json(await setPasswordFromLink(deps, body.token, body.password));
  });

  table.add({ method: 'get', path: '/me', access: 'user' }, async (req, res) => {
    const session = currentUser(req);
    const user = await User.findByPk(session.id);
    res.json({ user: toUserDto(user!), programs: await programsOf(session.id) });
  });

  void router;
}
