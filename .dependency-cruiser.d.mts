// Type of the import-boundary rules in .dependency-cruiser.mjs, for tests/architecture/boundaries.test.ts.
import type { IConfiguration } from 'dependency-cruiser';

declare const config: IConfiguration;
export default config;
