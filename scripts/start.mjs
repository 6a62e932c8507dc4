// npm start (after the build): the Electron window when Electron's binary is installed; otherwise
// the built renderer served on 127.0.0.1 and opened in an installed Chromium or Chrome as an app
// window with a profile folder of its own, or the URL printed when no browser is found.
// FALCIFORM_BROWSER=none only serves and prints the URL. Ctrl-C ends everything cleanly.
import { spawn } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { homedir } from 'node:os';
import { join } from 'node:path';
import { startWebServer } from '../build/main/web-server.js';
import { findBrowser, noBrowserReason } from '../build/src/cli/print-pdf.js';

const require = createRequire(import.meta.url);

function electronBinary() {
  try {
    const path = require('electron'); // the package's index.js gives the binary path, or throws
    return typeof path === 'string' && existsSync(path) ? path : null;
  } catch {
    return null;
  }
}

function dataFolder() {
  if (process.env.FALCIFORM_DATA_DIR) return process.env.FALCIFORM_DATA_DIR;
  if (process.platform === 'win32') return join(process.env.APPDATA ?? homedir(), 'Falciform');
  if (process.platform === 'darwin') return join(homedir(), 'Library', 'Application Support', 'Falciform');
  return join(process.env.XDG_DATA_HOME ?? join(homedir(), '.local', 'share'), 'falciform');
}


function runElectron(binary) {
  const child = spawn(binary, ['.'], { stdio: 'inherit' });
  const stop = () => child.kill('SIGTERM');
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
  child.on('exit', (code) => process.exit(code ?? 0));
}

/**
 * The browser keeps the store (IndexedDB) per origin, port included, so the served app reuses the
 * port it had last time. When that port is busy it stops and says so: opening on another port would
 * show an empty store, and remembering that port would lose the old store for good.
 */
async function serve(profile) {
  const portFile = join(profile, 'port');
  const last = existsSync(portFile) ? Number(readFileSync(portFile, 'utf8')) : 0;
  try {
    return await startWebServer('build/renderer', Number.isInteger(last) ? last : 0);
  } catch {
    if (!(last > 0)) throw new Error('no local port could be opened for the app');
    console.error(`Falciform stopped: port ${last}, where this profile's stored patients live, is busy. ` +
      `Close the program using it (see \`ss -ltnp 'sport = :${last}'\`, or an earlier Falciform still running) and start again.`);
    process.exit(1);
  }
}

async function runServed() {
  const profile = join(dataFolder(), 'browser-profile');
  // Owner-only: the profile holds the patients' store.
  mkdirSync(profile, { recursive: true, mode: 0o700 });
  chmodSync(dataFolder(), 0o700);
  chmodSync(profile, 0o700);
  const server = await serve(profile);
  writeFileSync(join(profile, 'port'), String(server.port));
  console.log(`Falciform is served at ${server.url}`);
  let browser = null;
  const stop = async () => {
    if (browser && browser.exitCode === null) browser.kill('SIGTERM');
    await server.close();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);

  const path = findBrowser();
  if (!path) {
    // Serving is enough to use the app; installing a browser is left to the user.
    const install = process.env.FALCIFORM_BROWSER ? '' : ' (or install Chromium, e.g. sudo apt-get install chromium, and run npm start again)';
    console.log(`No browser window: ${noBrowserReason()}. Open ${server.url} in any browser${install}. Ctrl-C to stop.`);
    return;
  }
  const started = Date.now();
  browser = spawn(path, [
    `--app=${server.url}`, `--user-data-dir=${profile}`, '--no-first-run', '--no-default-browser-check',
    '--disable-background-networking', '--disable-component-update', '--disable-sync', '--window-size=1440,920',
  ], { stdio: 'ignore' });
  browser.on('error', () => console.log('Could not start the browser: open the address above yourself. Ctrl-C to stop.'));
  browser.on('exit', () => {
    if (Date.now() - started < 3000) {
      console.log('The browser window closed at once (no display?): open the address above yourself. Ctrl-C to stop.');
      return;
    }
    void stop(); // the app window was closed: nothing left to serve
  });
}

/** Electron 45 and its packager ask for Node 22.12 or later; on older Node npm leaves both out. */
function whyNoElectron() {
  const [major, minor] = process.versions.node.split('.').map(Number);
  return major < 22 || (major === 22 && minor < 12)
    ? `it needs Node 22.12 or later and this is Node ${process.versions.node}`
    : 'its binary could not be downloaded from Electron\'s release site';
}

const electron = electronBinary();
if (electron) runElectron(electron);
else {
  console.log(`Electron is not installed (${whyNoElectron()}): the app opens in a browser window instead.`);
  await runServed();
}
