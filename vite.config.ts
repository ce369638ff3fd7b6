import { fileURLToPath } from 'node:url';
import tailwindcss from '@tailwindcss/vite';
import react from '@vitejs/plugin-react';
import { defineConfig } from 'vitest/config';

const sharedDir = fileURLToPath(new URL('./shared', import.meta.url));
const apiPort = process.env.PORT ?? '4310';

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: { alias: { '@shared': sharedDir } },
  build: { outDir: 'dist/client', emptyOutDir: true, chunkSizeWarningLimit: 6000 },
  server: { proxy: { '/api/': `http://127.0.0.1:${apiPort}` } },
  test: {
    include: ['tests/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 120_000,
    fileParallelism: true,
    maxWorkers: 2,
  },
});
