import { fileURLToPath } from 'node:url';
import process from 'node:process';
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

const DEFAULT_API_PORT = 4310;

/** The port of the local API, from CARTOUCHE_API_PORT when set. */
function apiPort(): number {
  const raw = process.env.CARTOUCHE_API_PORT;
  if (raw === undefined || raw.trim() === '') return DEFAULT_API_PORT;
  const port = Number(raw);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new Error(`CARTOUCHE_API_PORT must be a port number between 1 and 65535, got "${raw}".`);
  }
  return port;
}

export default defineConfig(({ command }) => {
  // Only the dev server and `vite preview` forward /api; a build never needs the port.
  const apiProxy =
    command === 'serve'
      ? { '/api': { target: `http://127.0.0.1:${apiPort()}`, changeOrigin: false } }
      : undefined;

  return {
    root: fileURLToPath(new URL('./client', import.meta.url)),
    plugins: [react(), tailwindcss()],
    build: {
      outDir: '../dist/client',
      emptyOutDir: true,
    },
    server: {
      proxy: apiProxy,
    },
    preview: {
      proxy: apiProxy,
    },
  };
});
