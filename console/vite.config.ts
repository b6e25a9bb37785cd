import tailwindcss from '@tailwindcss/vite';
import react from '@vitejs/plugin-react';
import path from 'node:path';
import { defineConfig } from 'vite';

export default defineConfig({
  root: import.meta.dirname,
  plugins: [react(), tailwindcss()],
  resolve: { alias: { '@': path.join(import.meta.dirname, 'src') } },
  server: {
    port: 5173,
    proxy: { '/v1': 'http://127.0.0.1:8080', '/openapi.yaml': 'http://127.0.0.1:8080', '/docs': 'http://127.0.0.1:8080' },
  },
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 2000 },
});
