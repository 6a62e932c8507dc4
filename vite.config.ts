import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';

// The renderer is served from disk (file:// in Electron, 127.0.0.1 otherwise): relative asset paths.
export default defineConfig({
  root: 'renderer',
  base: './',
  plugins: [react()],
  worker: { format: 'es' },
  build: { outDir: '../build/renderer', emptyOutDir: true, target: 'es2022', chunkSizeWarningLimit: 2000 },
});
