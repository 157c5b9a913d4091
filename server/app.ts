import express, { type Express } from 'express';
import rateLimit from 'express-rate-limit';
import helmet from 'helmet';

import { CLIENT_IP_HEADER } from './auth';
import type { AppContext } from './context';
import { errorBody } from './errors';
import { authHandler } from './middleware/auth-handler';
import { apiCompression } from './middleware/compression';
import { apiNotFound, errorHandler } from './middleware/errors';
import { sameOrigin } from './middleware/same-origin';
import { serverTiming } from './middleware/timing';
import { validate } from './middleware/validate';
import { signInLinkRequestSchema } from '../lib/schemas';
import { campaignRoutes } from './routes/campaigns';
import { signInLinkRequests } from './services/sign-in-links';
import { digestRoutes, unsubscribeRoutes } from './routes/digests';
import { diveRoutes } from './routes/dives';
import { exportRoutes } from './routes/exports';
import { mailRoutes } from './routes/mail';
import { measurementRoutes } from './routes/measurements';
import { observationRoutes } from './routes/observations';
import { photoRoutes } from './routes/photos';
import { reportRoutes } from './routes/reports';
import { searchRoutes } from './routes/search';
import { teamRoutes } from './routes/team';
import { taxaRoutes } from './routes/taxa';
import { watchRoutes } from './routes/watches';
import { telemetryRoutes } from './routes/telemetry';
import { refusedLinkReason } from './services/invitation-links';
import { webExport } from './services/web';
import { forwardToShip } from './mirror/forward';
import type { Mirror } from './mirror/mirror';
import { keepRelayedEntries } from './mirror/overlay';
import { mirrorStream } from './mirror/ship-stream';

export const API_CSP = "default-src 'none'; frame-ancestors 'none'";

/** Builds the whole HTTP app: API, sign-in and the web export, on one origin. */
export function createApp(ctx: AppContext, options: { mirror?: Mirror } = {}): Express {
  const { mirror } = options;
  const { env, auth, log } = ctx;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', trustProxySetting(env.TRUST_PROXY));
  app.set('query parser', 'simple');

  const web = webExport(env.WEB_DIR);
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'", ...web.scriptHashes],
          // react-native-web writes its styles into inline style elements at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          mediaSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          frameSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
          workerSrc: ["'self'", 'blob:'],
          ...(env.PUBLIC_URL.startsWith('https:') ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      crossOriginEmbedderPolicy: false,
      strictTransportSecurity: env.PUBLIC_URL.startsWith('https:'),
    }),
  );

  app.use('/api', apiCompression);
  // An API answer is data, never a page: the shortest policy that forbids everything (OWASP's REST
  // Security Cheat Sheet), and not the page's long one with its script hashes on every answer.
  app.use('/api', (_req, res, next) => {
    res.setHeader('Content-Security-Policy', API_CSP);
    next();
  });

  // better-auth reads the client address from this header only; set it from the socket (or the
  // configured proxy) so that a forged X-Forwarded-For cannot dodge the sign-in rate limit.
  app.use('/api', serverTiming);
  // A shore mirror sends sign-in and every change to the ship before anything here reads the body.
  if (mirror) app.use('/api', forwardToShip(mirror, ctx.auth, env.PUBLIC_URL, env.UPLOADS_DIR), keepRelayedEntries(mirror));
  app.use('/api/auth', (req, _res, next) => {
    req.headers[CLIENT_IP_HEADER] = req.ip ?? req.socket.remoteAddress ?? 'unknown';
    next();
  });
  // "E-mail me a sign-in link": ours, not better-auth's, so that it never says whether an address is known.
  const signInLinks = signInLinkRequests(ctx);
  const linkRequest = validate(signInLinkRequestSchema);
  app.post('/api/auth/sign-in/magic-link', sameOrigin(env.PUBLIC_URL), express.json({ limit: '8kb' }), linkRequest, async (req, res) => {
    const answer = await signInLinks(linkRequest.of(req).email, req.ip ?? req.socket.remoteAddress ?? 'unknown', (wait) =>
      res.setHeader('Retry-After', String(wait)),
    );
    res.json(answer);
  });
  app.all(
    '/api/auth/*splat',
    authHandler(
      auth,
      env.PUBLIC_URL,
      (token) => ctx.live.endSession(token),
      (token) => refusedLinkReason(ctx.db, token),
    ),
  );

  // Authorised by its signed link alone, posted by mail providers from their own servers.
  app.use('/api', unsubscribeRoutes(ctx));
  app.get('/api/mirror/stream', mirrorStream(ctx));
  app.use('/api', sameOrigin(env.PUBLIC_URL));
  app.use('/api', express.json({ limit: '256kb' }));
  app.use(
    '/api',
    rateLimit({
      windowMs: 60_000,
      limit: env.API_RATE_LIMIT,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      handler: (_req, res) => {
        res.status(429).json(errorBody('rate_limited', 'Too many requests; wait a moment and try again.'));
      },
    }),
  );
  app.get('/api/health', (_req, res) => {
    res.json({ ok: true, version: ctx.version, ...(mirror ? { mirror: mirror.status() } : {}) });
  });
  app.use('/api', campaignRoutes(ctx), teamRoutes(ctx), diveRoutes(ctx), observationRoutes(ctx), telemetryRoutes(ctx), photoRoutes(ctx));
  app.use('/api', mailRoutes(ctx), digestRoutes(ctx));
  app.use('/api', searchRoutes(ctx));
  app.use('/api', taxaRoutes(ctx));
  app.use('/api', watchRoutes(ctx));
  app.use('/api', measurementRoutes(ctx));
  app.use('/api', exportRoutes(ctx));
  app.use('/api', reportRoutes(ctx));
  app.use('/api', apiNotFound);

  app.use(...web.handlers);
  app.use(errorHandler(log));
  return app;
}

function trustProxySetting(value: string | undefined): boolean | number | string {
  if (value === undefined || value === '' || value === 'false') return false;
  if (value === 'true') return true;
  return /^\d+$/.test(value) ? Number(value) : value;
}
