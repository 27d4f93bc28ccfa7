import compression from 'compression';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import os from 'node:os';
import fs from 'node:fs';
import path from 'node:path';
import type { Db } from '../db/client';
import type { Clock } from './clock';
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
import type { AuthConfig } from './services/auth';
import type { Billing } from './services/billing-provider';
import type { SignInLimit } from './services/sign-in-throttle';
import type { ControlLink } from './services/control-link';
import { createFileStore, type FileStore } from './file-store';

export type AppDeps = {
  db: Db;
  clock: Clock;
  auth: AuthConfig;
  cookieSecure?: boolean;
  /** Folder of the exported web app; omitted in API tests. */
  webDir?: string;
  signInLimit?: SignInLimit;
  /** Base of links in e-mails and of payment return pages. */
  /** PUBLIC_URL when set: the address for mail links and the payment page's return. */
  publicUrl?: string;
  /** The address for mail links when PUBLIC_URL is not set (the server's own). */
  localUrl?: string;
  /** The payment provider; without it the billing screens read local records and payments answer 503. */
  billing?: Billing;
  /** Asked to deliver the outbox soon after a write queued mail; the outbox is delivered without it too. */
  mail?: { kick(): void };
  /** Where uploaded files (certificates of analysis) live; a fresh temporary folder when omitted (tests). */
  files?: FileStore;
  /** The read-only control-system link (OPC UA); without it its routes answer 503. */
  controlLink?: ControlLink;
};

// Failed sign-ins only. 300 per address per 15 min: a shift of up to 60 people behind one plant address, each
// mistyping up to 5 times at shift change, stays under it; guessing one account is held back per account below it.
// 5 free failures per account, then waits doubling from 1 s to 60 s (README, Sign-in limits).
const DEFAULT_SIGN_IN_LIMIT: SignInLimit = { perAddress: 300, perAccount: 5, windowMs: 15 * 60_000, maxDelayMs: 60_000 };
// Requests started per turn of the event loop: about 10 ms of work, so new connections are accepted every few ms
// under full load (see fairTurns); measured with `npm run load` at 200 connections.
const REQUESTS_PER_TURN = 16;

/** Builds the whole HTTP app around its dependencies; `server/start.ts` listens, tests call it directly. */
export function createApp(deps: AppDeps): Express {
  const app = express();
  const services = { db: deps.db, clock: deps.clock };
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
      strictTransportSecurity: deps.cookieSecure ? undefined : false,
    }),
  );
  app.use(compression());

  const linkUrl = deps.publicUrl ?? deps.localUrl ?? 'http://localhost:8080';
  // The payment page sends the browser back to PUBLIC_URL, else to the address the admin's browser used.
  const billingCtx = { ...services, billing: deps.billing ?? null, publicUrl: deps.publicUrl ?? null };
  const mail = deps.mail ?? null;
  // Before the API router: the provider's signature covers the raw body, which express.json would consume.
  app.post('/api/billing/webhook', ...billingWebhook(billingCtx));

  const api = express.Router();
  api.use(express.json({ limit: '1mb' }));
  api.use(requireWellFormedText);
  api.use(cookieParser());
  api.use(authenticate({ db: deps.db, clock: deps.clock, auth: deps.auth }));
  api.use(auditDenials(services));
  api.use(requireSameOrigin);
  api.use(requireWritableSite(services));
  api.use((_req, res, next) => {
    res.set('cache-control', 'no-store');
    next();
  });
  const mounts: ApiMount[] = [
    {
      prefix: '/session',
      router: sessionRouter({ ...services, auth: deps.auth, cookieSecure: deps.cookieSecure ?? false, signInLimit: deps.signInLimit ?? DEFAULT_SIGN_IN_LIMIT }),
    },
    { prefix: '/users', router: usersRouter({ ...services, auth: deps.auth, publicUrl: linkUrl, mail }) },
    { prefix: '/password-resets', router: passwordResetsRouter({ ...services, auth: deps.auth }) },
    { prefix: '/site', router: siteRouter(services) },
    { prefix: '/vessels', router: vesselsRouter(services) },
    { prefix: '/enzymes', router: enzymesRouter(services) },
    { prefix: '/lots', router: lotsRouter({ ...services, files: deps.files ?? createFileStore(fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-files-'))) }) },
    { prefix: '/recipes', router: recipesRouter(services) },
    { prefix: '/plans', router: plansRouter(services) },
    { prefix: '/batches', router: batchesRouter(services) },
    { prefix: '/calibrations', router: calibrationsRouter(services) },
    { prefix: '/deviations', router: deviationsRouter(services) },
    { prefix: '/control-link', router: controlLinkRouter({ ...services, link: deps.controlLink ?? null }) },
    { prefix: '/audit-events', router: auditEventsRouter(services) },
    {
      prefix: '/change-requests',
      router: changeRequestsRouter({ ...services, mail, publicUrl: linkUrl, signLimit: deps.signInLimit ?? DEFAULT_SIGN_IN_LIMIT }),
    },
    { prefix: '/billing', router: billingRouter(billingCtx) },
    { prefix: '/invites', router: invitesRouter({ ...billingCtx, publicUrl: linkUrl, mail }) },
    { prefix: '/mail-outbox', router: mailOutboxRouter({ ...services, mail }) },
  ];
  for (const m of mounts) api.use(m.prefix, m.router);
  app.locals.apiMounts = mounts;
  api.use(apiNotFound);
  app.use('/api', api);

  if (web) serveWeb(app, web, { db: deps.db, clock: deps.clock, auth: deps.auth });
  app.use(errorHandler);
  return app;
}
