import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';

// The editor build: root is the repo root, entry index.html -> apps/editor/src/main.tsx.
export default defineConfig({
  plugins: [react()],
  root: '.',
  build: { outDir: 'dist/editor', emptyOutDir: true, chunkSizeWarningLimit: 2000 },
  worker: { format: 'es' },
  server: { port: 5173, strictPort: false },
  preview: { port: 4173, strictPort: false },
});
