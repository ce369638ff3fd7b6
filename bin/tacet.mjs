#!/usr/bin/env node
// Entry point of `npx tacet`: runs the TypeScript command line through tsx's loader API.
// The project's tsconfig is named explicitly: tsx would look for one from the working directory, and
// without it the `@shared/` imports do not resolve when tacet runs elsewhere.
import { fileURLToPath } from 'node:url';
import { register } from 'tsx/esm/api';

register({ tsconfig: fileURLToPath(new URL('../tsconfig.json', import.meta.url)) });
const { runCli } = await import('../server/cli/main.ts');
process.exitCode = await runCli(process.argv.slice(2));
