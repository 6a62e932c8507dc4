import { isFalciformError, tooLarge } from '../../errors.js';
import { toRows } from '../../geometry/mat4.js';
import { DEFAULT_MAX_BYTES } from '../../volume/nifti-read.js';
import type { Volume } from '../../volume/volume.js';
import { UsageError, numberOption, parseArgs } from '../args.js';
import type { Command } from '../commands.js';
import { loadVolume } from '../node-io.js';
import { isDicomPath } from '../dicom-io.js';
import { inspectDicom } from './inspect-dicom.js';

/** Smallest and largest physical value (after scl_slope/scl_inter), ignoring NaN; null when all are NaN. */
export function valueRange(v: Volume): { min: number | null; max: number | null } {
  const d = v.data;
  let lo = Infinity;
  let hi = -Infinity;
  for (let n = 0; n < d.length; n++) {
    const x = d[n];
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  if (lo > hi) return { min: null, max: null };
  const a = lo * v.slope + v.inter;
  const b = hi * v.slope + v.inter;
  return { min: Math.min(a, b), max: Math.max(a, b) };
}

/** Header values are float32 or products of them: print 7 significant digits, not float noise. */
export function tidy(x: number): number {
  if (Number.isInteger(x)) return x;
  const digits = Math.max(7, Math.floor(Math.log10(Math.abs(x))) + 2);
  const y = Number(x.toPrecision(Math.min(digits, 17)));
  return Object.is(y, -0) ? 0 : y;
}

/** As tidy, and a millimetre amount below a nanometre is float32 rounding of a zero. */
export function tidyMm(x: number): number {
  return Math.abs(x) < 1e-6 ? 0 : tidy(x);
}

export const inspect: Command = {
  summary: 'header facts of a NIfTI-1/NIfTI-2 image (.nii, .nii.gz, .hdr/.img), a DICOM file or a folder of DICOM files',
  usage: 'falciform inspect PATH [--json] [--series UID] [--max-voxel-mib N]',
  async run(argv) {
    const args = parseArgs(argv, ['max-voxel-mib', 'series'], ['json']);
    if (args.positional.length !== 1) throw new UsageError('give exactly one image file or DICOM folder');
    const file = args.positional[0];
    const mib = numberOption(args, 'max-voxel-mib', DEFAULT_MAX_BYTES / 1024 ** 2);
    if (mib <= 0) throw new UsageError('--max-voxel-mib must be a positive number of MiB');
    if (await isDicomPath(file)) return inspectDicom(file, args, Math.floor(mib * 1024 ** 2));
    if (args.options.has('series')) throw new UsageError('--series applies to DICOM input only');
    let loaded;
    try {
      loaded = await loadVolume(file, { maxBytes: Math.floor(mib * 1024 ** 2) });
    } catch (e) {
      // The core does not know how the budget was set; the command line says how to raise it.
      if (isFalciformError(e) && e.kind === 'too-large') throw tooLarge(e.file, `${e.problem}; raise it with --max-voxel-mib N`);
      throw e;
    }
    const { info, volume, warnings } = loaded;
    const { min, max } = valueRange(volume);
    const out = {
      file,
      format: info.format,
      dims: info.dims,
      spacingMm: volume.spacingMm.map(tidyMm),
      datatype: info.datatype,
      affine: toRows(volume.affine).map((row) => row.map(tidyMm)),
      affineSource: info.affineSource,
      min: min === null ? null : tidy(min),
      max: max === null ? null : tidy(max),
      warnings,
    };
    if (args.options.has('json')) {
      process.stdout.write(`${JSON.stringify(out)}\n`);
      return;
    }
    const rows = out.affine.map((r) => `    [${r.map((x) => String(x).padStart(10)).join(' ')} ]`).join('\n');
    const endian = info.littleEndian ? 'little-endian' : 'big-endian';
    const scaling = info.slope !== 1 || info.inter !== 0 ? `, scaled ×${tidy(info.slope)} + ${tidy(info.inter)}` : '';
    process.stdout.write(
      `${file}\n` +
        `  ${info.format}${info.pair ? ' (.hdr/.img pair)' : ''}, ${info.dims.join(' × ')} voxels, ${info.datatype} ${endian}${scaling}\n` +
        `  spacing ${out.spacingMm.join(' × ')} mm; voxel to world (RAS mm) from the ${info.affineSource}:\n${rows}\n` +
        `  values ${out.min} to ${out.max}${info.volumeCount > 1 ? ' (first volume)' : ''}\n` +
        warnings.map((w) => `  note: ${w}\n`).join(''),
    );
  },
};
