// The system tools the test suite uses, checked before anything runs. When some are missing and the
// run is root on Debian or Ubuntu they are installed with apt-get (a fresh machine needs no third
// command); otherwise the run stops at once with the one command to type.
import { spawnSync } from 'node:child_process';
import { accessSync, constants, existsSync, readFileSync } from 'node:fs';
import { delimiter, join } from 'node:path';

function onPath(name) {
  for (const dir of (process.env.PATH ?? '').split(delimiter)) {
    try {
      accessSync(join(dir, name), constants.X_OK);
      return true;
    } catch {
      // not in this folder
    }
  }
  return false;
}

/** Python modules missing from Debian's /usr/bin/python3, asked in one run to keep the check quick. */
function missingPythonModules(modules) {
  if (!existsSync('/usr/bin/python3')) return new Set(modules);
  const probe = `import importlib.util as u\nfor m in ${JSON.stringify(modules)}:\n    print(m) if u.find_spec(m) is None else None\n`;
  const r = spawnSync('/usr/bin/python3', ['-c', probe], { encoding: 'utf8' });
  if (r.status !== 0) return new Set(modules);
  return new Set(r.stdout.split('\n').filter(Boolean));
}

/** Debian package, what the suite uses it for, and how to tell it is there. */
export const SYSTEM_TOOLS = [
  { pkg: 'chromium', why: 'end-to-end tests and the board PDF (/usr/bin/chromium)', present: () => existsSync('/usr/bin/chromium') },
  { pkg: 'fonts-dejavu-core', why: 'the board page fit test with only a fallback font', present: () => existsSync('/usr/share/fonts/truetype/dejavu/DejaVuSansMono.ttf') },
  { pkg: 'python3-nibabel', why: 'NIfTI reference values (nibabel)', module: 'nibabel' },
  { pkg: 'python3-scipy', why: 'labelling and distance reference values (SciPy)', module: 'scipy' },
  { pkg: 'python3-skimage', why: 'region measure reference values (scikit-image)', module: 'skimage' },
  { pkg: 'python3-pandas', why: 'reading the SAS XPORT cohort tables back (pandas read_sas)', module: 'pandas' },
  { pkg: 'python3-pydicom', why: 'DICOM reference values (pydicom)', module: 'pydicom' },
  { pkg: 'python3-pil', why: 'reading the board page\'s key images back (Pillow)', module: 'PIL' },
  { pkg: 'dcm2niix', why: 'DICOM-to-NIfTI reference conversions', present: () => onPath('dcm2niix') },
  { pkg: 'libgdcm-tools', why: 'JPEG-LS and JPEG 2000 DICOM test series, lossless and lossy (gdcmconv)', present: () => onPath('gdcmconv') },
  { pkg: 'time', why: 'peak memory of the command line in the analysis fuzz tests (/usr/bin/time -v)', present: () => existsSync('/usr/bin/time') },
  { pkg: 'poppler-utils', why: 'PDF pages, text and fonts (pdfinfo, pdftotext, pdffonts)', present: () => ['pdfinfo', 'pdftotext', 'pdffonts'].every(onPath) },
  { pkg: 'slurm-wlm', why: 'the cluster batch test (sbatch, slurmctld, slurmd)', present: () => ['sbatch', 'slurmctld', 'slurmd'].every(onPath) },
  { pkg: 'munge', why: 'authentication for the cluster batch test (munged)', present: () => onPath('munged') || existsSync('/usr/sbin/munged') },
];

export function missingTools(tools = SYSTEM_TOOLS) {
  const modules = tools.filter((t) => t.module).map((t) => t.module);
  const absentModules = modules.length ? missingPythonModules(modules) : new Set();
  return tools.filter((t) => (t.module ? absentModules.has(t.module) : !t.present()));
}

function isDebianLike() {
  try {
    const release = readFileSync('/etc/os-release', 'utf8');
    return /^(ID|ID_LIKE)=.*\b(debian|ubuntu)\b/m.test(release) && onPath('apt-get');
  } catch {
    return false;
  }
}

/**
 * Makes sure every tool is there. Returns true when the suite can run; false after printing the one
 * line naming the command that would install what is missing.
 */
export function ensureSystemTools() {
  const missing = missingTools();
  if (missing.length === 0) {
    console.log(`All ${SYSTEM_TOOLS.length} system tools the tests use are installed: ${SYSTEM_TOOLS.map((t) => t.pkg).join(', ')}.`);
    return true;
  }
  const pkgs = missing.map((t) => t.pkg);
  const asRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  if (!asRoot || !isDebianLike()) {
    const how = isDebianLike() ? 'run' : 'on Debian or Ubuntu run';
    console.error(`The tests need ${pkgs.join(', ')}: ${how} sudo apt-get install --no-install-recommends ${pkgs.join(' ')}`);
    return false;
  }
  console.log('Installing the system tools the tests use that this machine lacks:');
  for (const t of missing) console.log(`  ${t.pkg}: ${t.why}`);
  // CI has no stdin: apt must never ask a question.
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const run = (args) => spawnSync('apt-get', args, { stdio: ['ignore', 'inherit', 'inherit'], env }).status === 0;
  if (!run(['update', '-qq']) || !run(['install', '-y', '-qq', '--no-install-recommends', ...pkgs])) {
    console.error(`apt-get could not install ${pkgs.join(', ')}: run apt-get install --no-install-recommends ${pkgs.join(' ')} and read its message`);
    return false;
  }
  const still = missingTools(missing);
  if (still.length) {
    console.error(`Still missing after apt-get: ${still.map((t) => t.pkg).join(', ')}`);
    return false;
  }
  return true;
}
