import type { Router } from 'express';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { RouteTable } from '../lib/routes';
import { readDevInbox } from '../integrations/mailer';

export async function databaseUp(deps: Deps): Promise<boolean> {
  try {
    await Promise.race([
      deps.sequelize.query('SELECT 1'),
      new Promise((_, reject) => setTimeout(() => reject(new Error('timeout')), 2_000)),
    ]);
    return true;
  } catch {
    return false;
  }
}

export function systemRoutes(_router: Router, deps: Deps, table: RouteTable) {
  table.add({ method: 'get', path: '/health', access: 'public' }, async (_req, res) => {
    const up = await databaseUp(deps);
    res.status(up ? 200 : 503).json({ status: up ? 'ok' : 'degraded', db: up ? 'up' : 'down' });
  });

  // The dev inbox exists only while the local SMTP fake is in use (DEV_INBOX_URL set).
  const inboxUrl = deps.config.mail.devInboxUrl;
  if (inboxUrl) {
    table.add({ method: 'get', path: '/dev/mail', access: 'public' }, async (_req, res) => {
      try {
        res.json(await readDevInbox(inboxUrl));
      } catch {
        throw new AppError(503, 'mail/inbox-unavailable', 'The local mail fake is not answering.');
      }
    });
  }
}
