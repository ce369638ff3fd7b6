import { existsSync } from 'node:fs';
import { join } from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { sessionCookieName } from '@shared/headers';
import type { AppDeps } from './api/context';
import { issueCsrfCookie } from './api/middleware/csrf';
import { apiNotFound, errorHandler } from './api/middleware/errors';
import { requestLogger } from './api/middleware/requestLog';
import { apiRoutes, buildOpenApiDocument } from './api/openapi';
import { apiTokenRoutes } from './api/routes/apiTokens';
import { authRoutes } from './api/routes/auth';
import { bundleRoutes } from './api/routes/bundles';
import { causalSetRoutes } from './api/routes/causalSets';
import { cutRuleRoutes } from './api/routes/cutRules';
import { healthRoutes } from './api/routes/health';
import { limitsRoutes } from './api/routes/limits';
import { invitationRoutes } from './api/routes/invitations';
import { outboxRoutes } from './api/routes/outbox';
import { runRoutes } from './api/routes/runs';
import { studyRoutes } from './api/routes/studies';
import { teamRoutes } from './api/routes/team';
import { createApiTokenService } from './api/services/apiTokens';
import { createAuthService } from './api/services/auth';
import { createBundleService } from './api/services/bundles';
import { createCausalSetService } from './api/services/causalSets';
import { createCutRuleService } from './api/services/cutRules';
import { createHealthService } from './api/services/health';
import { createInvitationService } from './api/services/invitations';
import { createOutboxService } from './api/services/outbox';
import { createRunService } from './api/services/runs';
import { createRenderedExportCache } from './api/services/renderedExports';
import { createStudyService } from './api/services/studies';
import { createTeamService } from './api/services/team';

export type { AppDeps } from './api/context';

/** Builds the Express app; server/main.ts runs it, tests drive it through supertest. */
export function createApp(deps: AppDeps): Express {
  const { config, dataSource, mailer, redis, computeQueue } = deps;
  const invitations = createInvitationService({ config, dataSource, mailer });
  const auth = createAuthService({ config, dataSource, mailer, invitations });
  const teams = createTeamService({ dataSource });
  const outbox = createOutboxService({ dataSource });
  const runs = createRunService({ dataSource, computeQueue, renderedExports: createRenderedExportCache(config.exportCacheBytes) });
  const studies = createStudyService({ dataSource, computeQueue });
  const bundles = createBundleService({ dataSource, studies, runs });
  const cutRules = createCutRuleService({ dataSource });
  const causalSets = createCausalSetService({ dataSource });
  const health = createHealthService({ dataSource, redis, computeQueue, version: config.version });
  const apiTokens = createApiTokenService({ dataSource });
  const openApiDocument = buildOpenApiDocument({
    version: config.version,
    routes: apiRoutes.filter((route) => config.mode === 'development' || !route.developmentOnly),
  });

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  // Everything the client needs is served from here (no CDN). Plotly sets inline styles on its SVG
  // and exports images through data:/blob: URLs; nothing needs inline scripts or eval.
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          upgradeInsecureRequests: config.appUrl.startsWith('https:') ? [] : null,
        },
      },
      strictTransportSecurity: config.appUrl.startsWith('https:'),
    }),
  );

  const api = express.Router();
  if (deps.requestLog) api.use(requestLogger(deps.requestLog));
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use(issueCsrfCookie({ secure: config.appUrl.startsWith('https:'), sessionCookieName }));
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(healthRoutes({ health }));
  api.use(limitsRoutes());
  api.get('/openapi.json', (_req, res) => res.json(openApiDocument));
  api.use(authRoutes({ config, auth }));
  api.use(apiTokenRoutes({ auth, apiTokens }));
  api.use(teamRoutes({ auth, teams, invitations }));
  api.use(invitationRoutes({ auth, invitations }));
  api.use(runRoutes({ auth, teams, runs }));
  api.use(studyRoutes({ auth, teams, studies }));
  api.use(bundleRoutes({ auth, teams, bundles }));
  api.use(cutRuleRoutes({ auth, teams, cutRules }));
  api.use(causalSetRoutes({ auth, teams, causalSets }));
  if (config.mode === 'development') api.use(outboxRoutes({ auth, teams, outbox }));
  api.use(apiNotFound);
  api.use(errorHandler);
  app.use('/api', api);

  if (deps.clientDir && existsSync(join(deps.clientDir, 'index.html'))) {
    const indexHtml = join(deps.clientDir, 'index.html');
    app.use(express.static(deps.clientDir, { index: false, maxAge: '1h' }));
    // Every other GET is a client-side route: answer with the app shell and let React Router decide.
    app.get('/{*path}', (_req, res) => res.sendFile(indexHtml));
  }
  app.use(errorHandler);
  return app;
}
