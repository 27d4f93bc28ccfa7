import compression from 'compression';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { createContext, type ContextParts } from './context';
import type { ApiMount } from './route-table';
import { openWebExport, serveWeb } from './web-app';
import { auditDenials } from './middleware/audit-denials';
import { authenticate } from './middleware/auth';
import { fairTurns } from './middleware/fair-turns';
import { requireWellFormedText } from './middleware/well-formed';
import { requireSameOrigin } from './middleware/csrf';
import { requireWritableSite } from './middleware/site-writable';
import { apiNotFound, errorHandler } from './middleware/errors';
import { auditEventsRouter } from './routes/audit-events';
import { calibrationsRouter } from './routes/calibrations';
import { controlLinkRouter } from './routes/control-link';
import { batchesRouter } from './routes/batches';
import { deviationsRouter } from './routes/deviations';
import { billingRouter, billingWebhook } from './routes/billing';
import { changeRequestsRouter } from './routes/change-requests';
import { enzymesRouter } from './routes/enzymes';
import { invitesRouter } from './routes/invites';
import { lotsRouter } from './routes/lots';
import { plansRouter } from './routes/plans';
import { recipesRouter } from './routes/recipes';
import { mailOutboxRouter } from './routes/mail-outbox';
import { passwordResetsRouter } from './routes/password-resets';
import { sessionRouter } from './routes/session';
import { siteRouter } from './routes/site';
import { usersRouter } from './routes/users';
import { vesselsRouter } from './routes/vessels';

export type AppDeps = ContextParts & {
  /** Folder of the exported web app; omitted in API tests. */
  webDir?: string;
};

// Requests started per turn of the event loop: about 10 ms of work, so new connections are accepted every few ms
// under full load (see fairTurns); measured with `npm run load` at 200 connections.
const REQUESTS_PER_TURN = 16;

/** Builds the whole HTTP app around its dependencies; `server/start.ts` listens, tests call it directly. */
export function createApp(deps: AppDeps): Express {
  const app = express();
  const ctx = createContext(deps);
  app.disable('x-powered-by');
  // API answers are no-store, so an ETag (a hash of every body) is never used to revalidate; static files keep theirs.
  app.set('etag', false);
  app.set('trust proxy', 'loopback');
  app.use(fairTurns(REQUESTS_PER_TURN));
  const web = deps.webDir ? openWebExport(deps.webDir) : null;
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          // The bundle's files, and the export's own inline scripts by their hashes (the bundle loader of
          // server/web-build/rewrite.ts; Expo's own in the plain export).
          'script-src': ["'self'", ...(web ? [web.scriptSources] : [])],
          // react-native-web writes its styles into <style> elements at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'object-src': ["'none'"],
          'frame-ancestors': ["'none'"],
          'base-uri': ["'self'"],
          'form-action': ["'self'"],
          'upgrade-insecure-requests': null,
        },
      },
      strictTransportSecurity: ctx.cookieSecure ? undefined : false,
    }),
  );
  app.use(compression());

  // Before the API router: the provider's signature covers the raw body, which express.json would consume.
  app.post('/api/billing/webhook', ...billingWebhook(ctx));

  const api = express.Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(requireWellFormedText);
  api.use(cookieParser());
  api.use(authenticate(ctx));
  api.use(auditDenials(ctx));
  api.use(requireSameOrigin);
  api.use(requireWritableSite(ctx));
  api.use((_req, res, next) => {
    res.set('cache-control', 'no-store');
    next();
  });
  const mounts: ApiMount[] = [
    { prefix: '/session', router: sessionRouter(ctx) },
    { prefix: '/users', router: usersRouter(ctx) },
    { prefix: '/password-resets', router: passwordResetsRouter(ctx) },
    { prefix: '/site', router: siteRouter(ctx) },
    { prefix: '/vessels', router: vesselsRouter(ctx) },
    { prefix: '/enzymes', router: enzymesRouter(ctx) },
    { prefix: '/lots', router: lotsRouter(ctx) },
    { prefix: '/recipes', router: recipesRouter(ctx) },
    { prefix: '/plans', router: plansRouter(ctx) },
    { prefix: '/batches', router: batchesRouter(ctx) },
    { prefix: '/calibrations', router: calibrationsRouter(ctx) },
    { prefix: '/deviations', router: deviationsRouter(ctx) },
    { prefix: '/control-link', router: controlLinkRouter(ctx) },
    { prefix: '/audit-events', router: auditEventsRouter(ctx) },
    { prefix: '/change-requests', router: changeRequestsRouter(ctx) },
    { prefix: '/billing', router: billingRouter(ctx) },
    { prefix: '/invites', router: invitesRouter(ctx) },
    { prefix: '/mail-outbox', router: mailOutboxRouter(ctx) },
  ];
  for (const m of mounts) api.use(m.prefix, m.router);
  app.locals.apiMounts = mounts;
  api.use(apiNotFound);
  app.use('/api', api);

  if (web) serveWeb(app, web, ctx);
  app.use(errorHandler);
  return app;
}
