import fs from 'node:fs';
import path from 'node:path';
import compression from 'compression';
import express, { Router } from 'express';
import helmet from 'helmet';
import type { Deps } from './deps';
import { RouteTable } from './lib/routes';
import { errorHandler, notFoundRoute } from './middleware/errors';
import { adminRoutes } from './routes/admin';
import { assetRoutes } from './routes/assets';
import { authRoutes } from './routes/auth';
import { findingRoutes } from './routes/findings';
import { validationRoutes } from './routes/validation';
import { softwareRoutes } from './routes/software';
import { fleetRoutes } from './routes/fleet';
import { readinessRoutes } from './routes/readiness';
import { stageRoutes } from './routes/stages';
import { systemRoutes } from './routes/system';

export type AppOptions = { webDist?: string };

/** Builds the Express app (API and, when given, the exported web app) without listening. */
export function createApp(deps: Deps, options: AppOptions = {}) {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', false);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:', deps.config.s3.endpoint],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'", deps.config.s3.endpoint],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          upgradeInsecureRequests: null,
        },
      },
      crossOriginEmbedderPolicy: false,
    }),
  );
  app.use(compression());

  const api = Router();
  api.use(express.json({ limit: '1mb' }));
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  const table = new RouteTable(api, deps, '/api');
  systemRoutes(api, deps, table);
  authRoutes(api, deps, table);
  adminRoutes(api, deps, table);
  stageRoutes(api, deps, table);
  assetRoutes(api, deps, table);
  findingRoutes(api, deps, table);
  validationRoutes(api, deps, table);
  softwareRoutes(api, deps, table);
  fleetRoutes(api, deps, table);
  readinessRoutes(api, deps, table);
  api.use(notFoundRoute);
  app.use('/api', api);

  if (options.webDist && fs.existsSync(path.join(options.webDist, 'index.html'))) {
    const dist = options.webDist;
    app.use(
      express.static(dist, {
        index: false,
        // dist/assets/ (fonts) shares its name with the /assets route: never redirect to a folder.
        redirect: false,
        setHeaders(res, file) {
          // Hashed bundles never change; the HTML always revalidates.
          if (/[.-][0-9a-f]{16,}\.(js|css)$/.test(file) || file.includes(`${path.sep}assets${path.sep}`)) {
            res.set('Cache-Control', 'public, max-age=31536000, immutable');
          }
        },
      }),
    );
    app.get('/{*splat}', (_req, res) => {
      res.set('Cache-Control', 'no-cache');
      res.sendFile(path.join(dist, 'index.html'));
    });
  }

  app.use(errorHandler(deps.log));
  return { app, routes: table.routes };
}
