import { UsageError, numberOption, optionalOption, parseArgs, requireOption } from '../args.js';
import type { Command } from '../commands.js';
import { DEFAULT_MAX_BYTES } from '../../volume/nifti-read.js';
import type { WriteDatatype } from '../../volume/nifti-write.js';
import type { Volume } from '../../volume/volume.js';
import { saveVolume } from '../node-io.js';
import { loadScan } from '../scan-io.js';

/**
 * The narrowest NIfTI type that holds every physical value exactly: the stored type when it is one
 * the writer keeps bit for bit, else int16 when all values are whole and fit, else float32.
 */
function writeType(v: Volume): WriteDatatype {
  if (v.datatype === 'uint8' || v.datatype === 'int16' || v.datatype === 'float32') return v.datatype;
  for (let n = 0; n < v.data.length; n++) {
    const x = v.data[n] * v.slope + v.inter;
    if (!Number.isInteger(x) || x < -32768 || x > 32767) return 'float32';
  }
  return 'int16';
}

export const convert: Command = {
  summary: 'a DICOM series (or any readable image) written as NIfTI with the same world geometry',
  usage: 'falciform convert PATH --out FILE.nii.gz [--series UID] [--max-voxel-mib N]',
  async run(argv) {
    const args = parseArgs(argv, ['out', 'series', 'max-voxel-mib'], []);
    if (args.positional.length !== 1) throw new UsageError('give exactly one DICOM folder or image file');
    const out = requireOption(args, 'out');
    if (!/\.nii(\.gz)?$/i.test(out)) throw new UsageError('--out must end in .nii or .nii.gz');
    const mib = numberOption(args, 'max-voxel-mib', DEFAULT_MAX_BYTES / 1024 ** 2);
    const scan = await loadScan(args.positional[0], { series: optionalOption(args, 'series'), maxBytes: Math.floor(mib * 1024 ** 2) });
    await saveVolume(out, scan.volume, writeType(scan.volume));
    for (const w of scan.warnings) process.stderr.write(`note: ${w}\n`);
    const what = scan.kind === 'dicom' ? `series ${scan.dicom.chosen.id}` : 'image';
    process.stdout.write(`${out}: ${what}, ${scan.volume.dims.join(' × ')} voxels\n`);
  },
};
