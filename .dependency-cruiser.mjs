// Import boundaries of Tacet, checked by dependency-cruiser. `npm test` runs them
// (tests/architecture/boundaries.test.ts); `npx depcruise server src shared tests scripts bin` prints
// the same report.
// Paths are relative to the repository root. DEVELOPERS.md ("Import boundaries") says why each exists.

/** Modules that do I/O: never imported by the engine. */
const ioPackages = [
  'express', 'typeorm', 'bullmq', 'pg', 'ioredis', 'nodemailer', 'multer', 'jsonwebtoken', 'bcryptjs',
  'cookie-parser', 'helmet', 'express-rate-limit', 'reflect-metadata',
];
const ioCoreModules = [
  'fs', 'fs/promises', 'net', 'http', 'https', 'http2', 'tls', 'dgram', 'dns', 'child_process', 'cluster',
  'worker_threads', 'readline', 'process',
];

/** What the API and the worker may both import: the job contract and the layers below them. */
const neutralServer = [
  '^server/db/', '^server/engine/', '^server/queue/', '^server/runs/', '^server/threads/', '^server/studies/',
  '^server/causalSets/', '^server/exports/', '^server/mail/', '^server/config\\.ts$',
];
/** The API process: routes, services, middleware, and the app factory and entry point that mount them. */
const apiSide = '^server/(api/|app\\.ts$|main\\.ts$)';
const workerSide = '^server/worker/';

/** @type {import('dependency-cruiser').IConfiguration} */
export default {
  forbidden: [
    {
      name: 'shared-through-its-alias',
      severity: 'error',
      comment:
        "Outside shared/, import it as '@shared/<module>' (tsconfig paths, Vite's alias; tsx reads the tsconfig), " +
        'one spelling wherever the importing file sits.',
      from: { pathNot: '^shared/' },
      to: { path: '^shared/', dependencyTypesNot: ['aliased-tsconfig-paths'] },
    },
    {
      name: 'shared-imports-its-own-relatively',
      severity: 'error',
      comment: "Inside shared/, modules import each other as './<module>'.",
      from: { path: '^shared/' },
      to: { path: '^shared/', dependencyTypes: ['aliased'] },
    },
    {
      name: 'imports-resolve',
      severity: 'error',
      comment: 'An import that does not resolve (a misspelt path, a bare shared/… without the alias) fails here first.',
      from: { path: '^(server|src|shared|tests|scripts|bin)/' },
      to: { couldNotResolve: true },
    },
    {
      name: 'no-cycles',
      severity: 'error',
      comment: 'Modules of server/, src/ and shared/ import each other in one direction; a cycle makes load order matter.',
      from: { path: '^(server|src|shared)/' },
      // A cycle through type-only imports costs nothing at run time.
      to: { circular: true, viaOnly: { dependencyTypesNot: ['type-only'] } },
    },
    {
      name: 'engine-no-io',
      severity: 'error',
      comment:
        'The engine is pure numerics: no database, queue, HTTP, mail, files or threads. The native addon loader ' +
        '(linalg/nativeBackend.ts) may look for its .node file and read the CPU count.',
      from: { path: '^server/engine/', pathNot: '^server/engine/linalg/nativeBackend\\.ts$' },
      to: {
        path: [
          '^server/(?!engine/)',
          '^src/',
          `^(node:)?(${ioCoreModules.join('|')})$`,
          `(^|/)node_modules/(${ioPackages.join('|')})/`,
          '^(node:)?os$',
        ],
      },
    },
    {
      name: 'engine-addon-loader-no-io',
      severity: 'error',
      comment: 'The addon loader may check that a file exists, nothing more.',
      from: { path: '^server/engine/linalg/nativeBackend\\.ts$' },
      to: {
        path: [
          '^server/(?!engine/)',
          `^(node:)?(${ioCoreModules.filter((m) => m !== 'fs').join('|')})$`,
          `(^|/)node_modules/(${ioPackages.join('|')})/`,
        ],
      },
    },
    {
      name: 'shared-stands-alone',
      severity: 'error',
      comment: 'shared/ is read by the server and the client alike, so it imports neither.',
      from: { path: '^shared/' },
      to: { path: '^(server|src|tests|scripts)/' },
    },
    {
      name: 'api-imports-api-or-neutral',
      severity: 'error',
      comment: 'The API meets the worker only in the job contract (server/queue/) and the layers both use.',
      from: { path: apiSide },
      to: { path: '^server/', pathNot: [apiSide, ...neutralServer] },
    },
    {
      name: 'worker-imports-worker-or-neutral',
      severity: 'error',
      comment: 'The worker meets the API only in the job contract (server/queue/) and the layers both use.',
      from: { path: workerSide },
      to: { path: '^server/', pathNot: [workerSide, ...neutralServer] },
    },
    {
      name: 'api-never-reaches-worker',
      severity: 'error',
      comment: 'Not even through a neutral module: nothing the API loads may load worker code.',
      from: { path: apiSide },
      to: { path: workerSide, reachable: true },
    },
    {
      name: 'worker-never-reaches-api',
      severity: 'error',
      comment: 'Not even through a neutral module: nothing the worker loads may load API code.',
      from: { path: workerSide },
      to: { path: apiSide, reachable: true },
    },
    {
      name: 'server-not-client',
      severity: 'error',
      comment: 'The server and the client share code only through shared/.',
      from: { path: '^server/' },
      to: { path: '^src/' },
    },
    {
      name: 'client-not-server',
      severity: 'error',
      comment: 'The server and the client share code only through shared/.',
      from: { path: '^src/' },
      to: { path: '^(server|tests|scripts)/' },
    },
    {
      name: 'feature-imports-only-shared-pieces',
      severity: 'error',
      comment:
        'A client feature imports src/ui, src/lib, src/app, shared/ and the api/ hooks of other features; ' +
        'a component or helper two features need belongs in src/ui or src/lib.',
      from: { path: '^src/features/([^/]+)/' },
      to: {
        path: '^(src/|tailwind\\.config\\.ts$)',
        pathNot: ['^src/(ui|lib|app)/', '^src/features/$1/', '^src/features/[^/]+/api/', '^src/styles\\.css$'],
      },
    },
    {
      name: 'shared-pieces-stand-below-features',
      severity: 'error',
      comment:
        "src/ui and src/lib serve every feature, so they import neither the shell nor a feature's components, " +
        "helpers or pages; a feature's api/ hooks are its public face (the causal-set picker lists the team's sets).",
      from: { path: '^src/(ui|lib)/' },
      to: { path: '^src/(features|app)/', pathNot: '^src/features/[^/]+/api/' },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    // One crossing of each rule, on purpose (the boundary test cruises it on its own).
    exclude: { path: '^tests/architecture/fixtures/' },
    // Type-only imports count for the boundaries: they couple modules too.
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
      mainFields: ['module', 'main', 'types', 'typings'],
    },
  },
};
