import { OpenAPIRegistry, OpenApiGeneratorV31, type RouteConfig } from '@asteasolutions/zod-to-openapi';
import { z, type ZodType } from 'zod';
import { apiErrorSchema, healthResponseSchema } from '@shared/api';
import { apiTokenSchema, createApiTokenRequestSchema, createdApiTokenSchema } from '@shared/apiTokens';
import {
  loginRequestSchema,
  meResponseSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  sessionResponseSchema,
  signupRequestSchema,
  updateMeRequestSchema,
  userSchema,
} from '@shared/auth';
import { csrfHeaderName, sessionCookieName, teamHeaderName } from '@shared/headers';
import { createRunBundleRequestSchema } from '@shared/bundles';
import { causalSetDetailSchema, causalSetListResponseSchema, causalSetMetadataSchema } from '@shared/causalSets';
import { runExportFormats, runExports, studyExportQuerySchema, type RunExportRow } from '@shared/exports';
import { engineLimitsSchema } from '@shared/limits';
import { permissions, roleSchema, type Permission } from '@shared/roles';
import {
  createCutRuleRequestSchema,
  createRunRequestSchema,
  cutRuleSchema,
  listRunsQuerySchema,
  reanalyseRunRequestSchema,
  reseededRunSchema,
  runDetailSchema,
  runListResponseSchema,
  runPointsSchema,
} from '@shared/runs';
import {
  createStudyRequestSchema,
  extendStudyRequestSchema,
  listStudiesQuerySchema,
  queuedCellsResponseSchema,
  studyCellRunRequestSchema,
  studyDetailSchema,
  studyListResponseSchema,
} from '@shared/studies';
import {
  changeRoleRequestSchema,
  createInvitationRequestSchema,
  invitationPreviewSchema,
  invitationSchema,
  memberSchema,
  outboxMessageSchema,
  renameTeamRequestSchema,
} from '@shared/teams';

/**
 * Who may call a route: anyone, any signed-in user (session or API token), a signed-in browser or
 * app session only (not an API token), or a team role permission from shared/roles.ts.
 */
export type RouteAccess = 'public' | 'signedIn' | 'sessionOnly' | Permission;

type Method = 'get' | 'post' | 'patch' | 'delete';

/** One API route as the OpenAPI description shows it; `path` is in Express form (`/api/runs/:id`). */
export interface ApiRouteDescription {
  method: Method;
  path: string;
  summary: string;
  tag: string;
  access: RouteAccess;
  status: number;
  body?: ZodType;
  multipart?: ZodType;
  query?: ZodType;
  /** JSON answer; omitted for 204, or for file answers given by `produces` */
  response?: ZodType;
  produces?: string;
  /** development mode only */
  developmentOnly?: boolean;
}

const idAnswer = z.object({ id: z.string() });
const list = (item: ZodType) => z.object({ items: z.array(item) });
const teamSchema = z.object({ id: z.string(), name: z.string(), role: roleSchema });

/**
 * Every route the API serves. tests/api/accessMatrix.test.ts checks this list against the routes
 * Express actually has, so a route added without a line here fails the suite.
 */
export const apiRoutes: ApiRouteDescription[] = [
  { method: 'get', path: '/api/health', summary: 'Service health: database, queue, workers', tag: 'platform', access: 'public', status: 200, response: healthResponseSchema },
  { method: 'get', path: '/api/limits', summary: 'Size limits of the dense (per linear-algebra backend) and structured engines, and the rule that picks one', tag: 'platform', access: 'public', status: 200, response: engineLimitsSchema },
  { method: 'get', path: '/api/openapi.json', summary: 'This description', tag: 'platform', access: 'public', status: 200, produces: 'application/json' },

  { method: 'post', path: '/api/auth/signup', summary: 'Create an account (and a team, or join an invitation)', tag: 'auth', access: 'public', status: 201, body: signupRequestSchema, response: sessionResponseSchema },
  { method: 'post', path: '/api/auth/login', summary: 'Sign in; sets the session and CSRF cookies', tag: 'auth', access: 'public', status: 200, body: loginRequestSchema, response: sessionResponseSchema },
  { method: 'post', path: '/api/auth/logout', summary: 'Sign out: the session token stops working', tag: 'auth', access: 'signedIn', status: 204 },
  { method: 'post', path: '/api/auth/password-reset', summary: 'E-mail a password reset link (always 202)', tag: 'auth', access: 'public', status: 202, body: passwordResetRequestSchema, response: z.object({ ok: z.literal(true) }) },
  { method: 'post', path: '/api/auth/password-reset/confirm', summary: 'Set a new password with a reset token; signs out everywhere', tag: 'auth', access: 'public', status: 204, body: passwordResetConfirmSchema },
  { method: 'get', path: '/api/me', summary: 'The signed-in user and their teams', tag: 'auth', access: 'signedIn', status: 200, response: meResponseSchema },
  { method: 'patch', path: '/api/me', summary: 'Change name or run e-mails', tag: 'auth', access: 'signedIn', status: 200, body: updateMeRequestSchema, response: userSchema },

  { method: 'get', path: '/api/me/tokens', summary: 'Your personal API tokens that still work', tag: 'tokens', access: 'sessionOnly', status: 200, response: list(apiTokenSchema) },
  { method: 'post', path: '/api/me/tokens', summary: 'Create a personal API token for one team (the secret is shown once)', tag: 'tokens', access: 'sessionOnly', status: 201, body: createApiTokenRequestSchema, response: createdApiTokenSchema },
  { method: 'delete', path: '/api/me/tokens/:id', summary: 'Revoke a personal API token', tag: 'tokens', access: 'sessionOnly', status: 204 },

  { method: 'get', path: '/api/team', summary: 'The current team and your role', tag: 'team', access: 'read', status: 200, response: teamSchema },
  { method: 'patch', path: '/api/team', summary: 'Rename the team', tag: 'team', access: 'manageTeam', status: 200, body: renameTeamRequestSchema, response: teamSchema },
  { method: 'get', path: '/api/team/members', summary: 'Members of the team', tag: 'team', access: 'read', status: 200, response: list(memberSchema) },
  { method: 'patch', path: '/api/team/members/:userId', summary: "Change a member's role", tag: 'team', access: 'manageTeam', status: 200, body: changeRoleRequestSchema, response: memberSchema },
  { method: 'delete', path: '/api/team/members/:userId', summary: 'Remove a member', tag: 'team', access: 'manageTeam', status: 204 },
  { method: 'get', path: '/api/team/invitations', summary: 'Open invitations', tag: 'team', access: 'manageTeam', status: 200, response: list(invitationSchema) },
  { method: 'post', path: '/api/team/invitations', summary: 'Invite someone by e-mail', tag: 'team', access: 'manageTeam', status: 201, body: createInvitationRequestSchema, response: invitationSchema },
  { method: 'delete', path: '/api/team/invitations/:id', summary: 'Withdraw an invitation', tag: 'team', access: 'manageTeam', status: 204 },
  { method: 'get', path: '/api/invitations/:token', summary: 'Preview an invitation link', tag: 'team', access: 'public', status: 200, response: invitationPreviewSchema },
  { method: 'post', path: '/api/invitations/:token/accept', summary: 'Accept an invitation addressed to you', tag: 'team', access: 'signedIn', status: 200, response: z.object({ team: z.object({ id: z.string(), name: z.string() }), role: roleSchema }) },
  { method: 'get', path: '/api/outbox', summary: 'Mail the app sent for this team (development only)', tag: 'team', access: 'manageTeam', status: 200, response: list(outboxMessageSchema), developmentOnly: true },

  { method: 'post', path: '/api/runs', summary: 'Submit a vacuum run', tag: 'runs', access: 'compute', status: 202, body: createRunRequestSchema, response: idAnswer },
  { method: 'get', path: '/api/runs', summary: 'Runs of the team, sorted, filtered and paged', tag: 'runs', access: 'read', status: 200, query: listRunsQuerySchema, response: runListResponseSchema },
  { method: 'get', path: '/api/runs/:id', summary: 'A run: status, progress and, when done, its result', tag: 'runs', access: 'read', status: 200, response: runDetailSchema },
  { method: 'post', path: '/api/runs/:id/cancel', summary: 'Cancel a queued or running run', tag: 'runs', access: 'compute', status: 200, response: runDetailSchema },
  { method: 'post', path: '/api/runs/:id/reanalyse', summary: 'A new run on the same points with other settings', tag: 'runs', access: 'compute', status: 202, body: reanalyseRunRequestSchema, response: idAnswer },
  { method: 'post', path: '/api/runs/:id/retry', summary: 'Queue a failed or cancelled run again, as a new run that records which it retries', tag: 'runs', access: 'compute', status: 202, response: idAnswer },
  { method: 'post', path: '/api/runs/:id/reseed', summary: 'The same settings on a new sprinkling with a fresh seed, as a new run', tag: 'runs', access: 'compute', status: 202, response: reseededRunSchema },
  { method: 'delete', path: '/api/runs/:id', summary: 'Delete a run (cancels it first when running)', tag: 'runs', access: 'compute', status: 204 },
  { method: 'get', path: '/api/runs/:id/points', summary: 'The causal set elements of a done run', tag: 'runs', access: 'read', status: 200, response: runPointsSchema },
  ...runExportFormats.map((format): ApiRouteDescription => {
    const row: RunExportRow = runExports[format];
    const answer = row.schema ? { response: row.schema } : { produces: row.contentType.split(';')[0]! };
    return { method: 'get', path: `/api/runs/:id/${format}`, summary: row.summary, tag: 'runs', access: 'read', status: 200, ...answer };
  }),

  { method: 'get', path: '/api/cut-rules', summary: "The team's saved truncation rules", tag: 'cut rules', access: 'read', status: 200, response: list(cutRuleSchema) },
  { method: 'post', path: '/api/cut-rules', summary: 'Save a truncation rule', tag: 'cut rules', access: 'compute', status: 201, body: createCutRuleRequestSchema, response: cutRuleSchema },
  { method: 'delete', path: '/api/cut-rules/:id', summary: 'Delete a saved truncation rule', tag: 'cut rules', access: 'compute', status: 204 },

  { method: 'get', path: '/api/causal-sets', summary: 'Imported causal sets and the upload limits', tag: 'causal sets', access: 'read', status: 200, response: causalSetListResponseSchema },
  { method: 'post', path: '/api/causal-sets', summary: 'Import a causal set file (multipart: metadata fields and "file")', tag: 'causal sets', access: 'compute', status: 201, multipart: causalSetMetadataSchema, response: idAnswer },
  { method: 'get', path: '/api/causal-sets/:id', summary: 'A causal set with its preview', tag: 'causal sets', access: 'read', status: 200, response: causalSetDetailSchema },
  { method: 'get', path: '/api/causal-sets/:id/file', summary: 'The file as uploaded', tag: 'causal sets', access: 'read', status: 200, produces: 'text/csv' },
  { method: 'delete', path: '/api/causal-sets/:id', summary: 'Delete a causal set (runs keep their copy)', tag: 'causal sets', access: 'compute', status: 204 },

  { method: 'post', path: '/api/studies', summary: 'Submit a scaling study', tag: 'studies', access: 'compute', status: 202, body: createStudyRequestSchema, response: idAnswer },
  { method: 'get', path: '/api/studies', summary: 'Scaling studies of the team, searched and filtered', tag: 'studies', access: 'read', status: 200, query: listStudiesQuerySchema, response: studyListResponseSchema },
  { method: 'get', path: '/api/studies/:id', summary: 'A study: progress, aggregates and fits', tag: 'studies', access: 'read', status: 200, response: studyDetailSchema },
  { method: 'post', path: '/api/studies/:id/cancel', summary: 'Cancel the cells not yet computed', tag: 'studies', access: 'compute', status: 200, response: studyDetailSchema },
  { method: 'post', path: '/api/studies/:id/extend', summary: 'Add N values and/or seeds to a study over sprinklings; the missing cells are queued', tag: 'studies', access: 'compute', status: 202, body: extendStudyRequestSchema, response: queuedCellsResponseSchema },
  { method: 'post', path: '/api/studies/:id/retry-failed', summary: 'Queue every failed cell of a study again', tag: 'studies', access: 'compute', status: 202, response: queuedCellsResponseSchema },
  { method: 'post', path: '/api/studies/:id/cells/:cellId/retry', summary: 'Queue one failed cell of a study again', tag: 'studies', access: 'compute', status: 202, response: queuedCellsResponseSchema },
  { method: 'post', path: '/api/studies/:id/cells/:cellId/run', summary: "A finished cell's sprinkling, subregion and cut rule as a vacuum run (with its diagnostics, spectrum and points)", tag: 'studies', access: 'compute', status: 202, body: studyCellRunRequestSchema, response: idAnswer },
  { method: 'delete', path: '/api/studies/:id', summary: 'Delete a study', tag: 'studies', access: 'compute', status: 204 },
  { method: 'get', path: '/api/studies/:id/export', summary: 'Export a study (CSV, LaTeX, JSON, BibTeX, methods)', tag: 'studies', access: 'read', status: 200, query: studyExportQuerySchema, produces: 'text/plain' },
  { method: 'get', path: '/api/studies/:id/bundle', summary: 'Supplementary bundle of a study, streamed as a zip: points of every sprinkling, spectra, tables (CSV, LaTeX), figures (SVG, PDF), methods, BibTeX, README and manifest.json (SHA-256 of each file, every entropy with its inputs); x-tacet-bundle-files gives the file count', tag: 'studies', access: 'read', status: 200, produces: 'application/zip' },
  { method: 'post', path: '/api/bundles', summary: 'Supplementary bundle of chosen done runs of the team, streamed as a zip (as the study bundle)', tag: 'runs', access: 'read', status: 200, body: createRunBundleRequestSchema, produces: 'application/zip' },
];

const accessWords: Record<RouteAccess, string> = {
  public: 'Public.',
  signedIn: 'Any signed-in user (session or API token).',
  sessionOnly: 'A signed-in app session; personal API tokens are refused (403).',
  read: `Team role: ${permissions.read.join(', ')}.`,
  compute: `Team role: ${permissions.compute.join(', ')}.`,
  manageTeam: `Team role: ${permissions.manageTeam.join(', ')}.`,
};

const errorResponse = (description: string) => ({ description, content: { 'application/json': { schema: apiErrorSchema } } });

/** `/api/runs/:id` → `/api/runs/{id}` and the names of its path parameters. */
export function openApiPath(expressPath: string): { path: string; params: string[] } {
  const params: string[] = [];
  const path = expressPath.replace(/:([A-Za-z_]+)/g, (_m, name: string) => {
    params.push(name);
    return `{${name}}`;
  });
  return { path, params };
}

function routeConfig(route: ApiRouteDescription): RouteConfig {
  const { path, params } = openApiPath(route.path);
  const teamScoped = route.access === 'read' || route.access === 'compute' || route.access === 'manageTeam';
  const request: RouteConfig['request'] = {};
  if (params.length) request.params = z.object(Object.fromEntries(params.map((p) => [p, z.string()])));
  if (route.query) request.query = route.query as RouteConfig['request'] extends { query?: infer Q } ? Q : never;
  if (teamScoped) request.headers = z.object({ [teamHeaderName]: z.uuid().optional() });
  if (route.body) request.body = { required: true, content: { 'application/json': { schema: route.body } } };
  if (route.multipart) {
    const form = (route.multipart as z.ZodObject).extend({ file: z.string().meta({ format: 'binary' }) });
    request.body = { required: true, content: { 'multipart/form-data': { schema: form } } };
  }
  const success =
    route.status === 204
      ? { description: 'Done, no content.' }
      : route.response
        ? { description: 'Success.', content: { 'application/json': { schema: route.response } } }
        : { description: 'Success.', content: { [route.produces ?? 'application/octet-stream']: { schema: z.string() } } };
  const responses: RouteConfig['responses'] = { [route.status]: success };
  if (route.body || route.query || route.multipart) responses[400] = errorResponse('The request does not match the schema; `issues` lists the fields.');
  if (route.access !== 'public') responses[401] = errorResponse('Not signed in, or the token expired or was revoked.');
  if (route.access !== 'public' && route.access !== 'signedIn') responses[403] = errorResponse('Your role does not allow this, or (browser) the CSRF header is missing.');
  if (params.length || teamScoped) responses[404] = errorResponse('Not found, or it belongs to another team.');
  return {
    method: route.method,
    path,
    summary: route.summary,
    description: accessWords[route.access] + (route.developmentOnly ? ' Development mode only.' : ''),
    tags: [route.tag],
    security: route.access === 'public' ? [] : [{ bearer: [] }, { session: [] }],
    request,
    responses,
    'x-tacet-access': route.access,
  } as RouteConfig;
}

/** The OpenAPI 3.1 description of `routes`, generated from the shared zod schemas. */
export function buildOpenApiDocument(options: { version: string; routes?: ApiRouteDescription[] }) {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'bearer', {
    type: 'http',
    scheme: 'bearer',
    description: 'A personal API token (Account page, starts with tct_) or the session token from sign-in.',
  });
  registry.registerComponent('securitySchemes', 'session', {
    type: 'apiKey',
    in: 'cookie',
    name: sessionCookieName,
    description: `Browser session. Writes must also send the ${csrfHeaderName} header with the value of the tacet_csrf cookie.`,
  });
  for (const route of options.routes ?? apiRoutes) registry.registerPath(routeConfig(route));
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Tacet API',
      version: options.version,
      description:
        'Vacuum runs, scaling studies and imported causal sets of a team. Errors are `{ error: { code, message, issues? } }`. ' +
        `Choose the team with the ${teamHeaderName} header (an API token always acts in its own team).`,
    },
    servers: [{ url: '/' }],
  });
}
