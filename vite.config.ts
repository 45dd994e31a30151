import { fileURLToPath } from 'node:url';
import tailwindcss from '@tailwindcss/vite';
import react from '@vitejs/plugin-react';
import { defineConfig } from 'vite';

const root = fileURLToPath(new URL('.', import.meta.url));
const apiTarget = `http://127.0.0.1:${process.env.API_PORT ?? 3000}`;

// The dev server forwards /api to the Express app; the Host header stays the dev server's,
// so session cookies and same-origin checks see one origin.
const proxy = { '/api': { target: apiTarget, xfwd: true } };

export default defineConfig({
  root,
  plugins: [react(), tailwindcss()],
  resolve: {
    alias: [{ find: /^@\//, replacement: `${fileURLToPath(new URL('./frontend/', import.meta.url))}` }],
  },
  build: {
    // The server is built beside it, into dist/server (tsconfig.server.json).
    outDir: 'dist/app',
    emptyOutDir: true,
  },
  server: { port: 5173, strictPort: true, proxy },
  preview: { port: 4173, proxy },
});
