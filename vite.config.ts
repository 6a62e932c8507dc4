import { copyFileSync, cpSync, existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { defineConfig, type Plugin } from 'vite';
import react from '@vitejs/plugin-react';
import { SHIPPED_FONTS } from './src/report/fonts.ts';

/**
 * Copies the generated demo patients (demo-data/, made at install) into the built app as demo/, so the
 * first start can import them into the store.
 */
function demoPatients(): Plugin {
  const source = resolve('demo-data');
  return {
    name: 'falciform-demo-patients',
    apply: 'build',
    writeBundle(options) {
      if (!existsSync(join(source, 'index.json'))) {
        this.warn('demo-data/index.json is missing: run `npm run demo:generate`; the app starts without demo patients');
        return;
      }
      cpSync(source, join(options.dir!, 'demo'), {
        recursive: true,
        filter: (path) => !path.endsWith('.ts'),
      });
    },
  };
}

/** Each shipped font's licence beside its font files in the built app (assets/). */
function fontLicences(): Plugin {
  const require = createRequire(import.meta.url);
  return {
    name: 'falciform-font-licences',
    apply: 'build',
    writeBundle(options) {
      for (const font of SHIPPED_FONTS) {
        const dir = dirname(require.resolve(`${font.pkg}/package.json`));
        copyFileSync(join(dir, 'LICENSE'), join(options.dir!, 'assets', `${font.pkg.split('/')[1]}-LICENSE.txt`));
      }
    },
  };
}

// The renderer is served from its own origin (falciform://app in Electron, 127.0.0.1 otherwise):
// relative asset paths keep both working.
export default defineConfig({
  root: 'renderer',
  base: './',
  plugins: [react(), demoPatients(), fontLicences()],
  worker: { format: 'es' },
  build: { outDir: '../build/renderer', emptyOutDir: true, target: 'es2022', chunkSizeWarningLimit: 2000 },
});
