import type { NextFunction, Request, RequestHandler, Response } from 'express';
import jwt from 'jsonwebtoken';
import type { Role } from '../../shared/schemas/auth';
import { AppError, forbidden } from '../lib/app-error';
import { User } from '../db/models';
import type { Deps } from '../deps';

export const JWT_ALGORITHM = 'HS256' as const;

export type SessionUser = { id: string; email: string; name: string; role: Role; programIds: string[] };

declare module 'express-serve-static-core' {
  interface Request {
    user?: SessionUser;
  }
}

const unauthenticated = () =>
  new AppError(401, 'auth/unauthenticated', 'Your session has ended or is not valid. Please sign in again.');

export function signToken(deps: Deps, user: { id: string; tokenVersion: number }): string {
  return jwt.sign({ tv: user.tokenVersion }, deps.config.jwt.secret, {
    algorithm: JWT_ALGORITHM,
    subject: user.id,
    expiresIn: deps.config.jwt.expiresInSeconds,
  });
}

export function requireAuth(deps: Deps): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    const header = req.get('authorization') ?? '';
    const match = /^Bearer ([A-Za-z0-9._~+/=-]+)$/.exec(header);
    if (!match) return next(unauthenticated());
    let payload: jwt.JwtPayload;
    try {
      // The algorithm is pinned: a token signed with any other algorithm (or "none") is refused.
      payload = jwt.verify(match[1], deps.config.jwt.secret, { algorithms: [JWT_ALGORITHM] }) as jwt.JwtPayload;
    } catch {
      return next(unauthenticated());
    }
    if (typeof payload.sub !== 'string' || !/^[0-9a-f-]{36}$/i.test(payload.sub)) return next(unauthenticated());
    const [rows] = (await deps.sequelize.query(
      `SELECT u.id, u.email, u.name, u.role, u.active, u.token_version,
              COALESCE(array_agg(pm.program_id) FILTER (WHERE pm.program_id IS NOT NULL), '{}') AS program_ids
         FROM users u LEFT JOIN program_members pm ON pm.user_id = u.id
        WHERE u.id = $1 GROUP BY u.id`,
      { bind: [payload.sub] },
    )) as [Array<{ id: string; email: string; name: string; role: Role; active: boolean; token_version: number; program_ids: string[] }>, unknown];
    const row = rows[0];
    if (!row || !row.active || row.token_version !== payload.tv) return next(unauthenticated());
    req.user = { id: row.id, email: row.email, name: row.name, role: row.role, programIds: row.program_ids };
    next();
  };
}

export function requireRoles(roles: readonly Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.user || !roles.includes(req.user.role)) return next(forbidden());
    next();
  };
}

export function currentUser(req: Request): SessionUser {
  if (!req.user) throw unauthenticated();
  return req.user;
}

export type { User };
