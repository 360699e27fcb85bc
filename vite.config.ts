/** Builds the review renderer (app/renderer) into dist/renderer; served by the one request handler. */
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import path from 'node:path';

export default defineConfig({
  root: path.resolve(import.meta.dirname, 'app/renderer'),
  base: './',
  plugins: [react()],
  build: {
    outDir: path.resolve(import.meta.dirname, 'dist/renderer'),
    emptyOutDir: true,
    // The strict CSP forbids inline scripts; Vite's module-preload polyfill would be one.
    modulePreload: { polyfill: false },
    sourcemap: true,
    target: 'es2022',
  },
});
