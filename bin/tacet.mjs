#!/usr/bin/env node
// Entry point of `npx tacet`: runs the TypeScript command line through tsx's loader API.
import { register } from 'tsx/esm/api';

register();
const { runCli } = await import('../server/cli/main.ts');
process.exitCode = await runCli(process.argv.slice(2));
