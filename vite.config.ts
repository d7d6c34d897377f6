import { defineConfig } from 'vite';

/**
 * The visualiser's build. `npm start` serves it (dev); the e2e tests and the browser
 * benchmark build it and serve dist/ with `vite preview` on a fixed port.
 */
export const PREVIEW_PORT = 4317;

export default defineConfig({
  worker: { format: 'es' },
  build: { outDir: 'dist', target: 'es2022', chunkSizeWarningLimit: 1200 },
  preview: { port: PREVIEW_PORT, strictPort: true },
});
