import { UsageError, numberOption, optionalOption, parseArgs, requireOption } from '../args.js';
import type { Command } from '../commands.js';
import { DEFAULT_MAX_BYTES } from '../../volume/nifti-read.js';
import { exactWriteType } from '../../volume/write-type.js';
import { saveVolume } from '../node-io.js';
import { loadScan } from '../scan-io.js';

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
    await saveVolume(out, scan.volume, exactWriteType(scan.volume));
    for (const w of scan.warnings) process.stderr.write(`note: ${w}\n`);
    const what = scan.kind === 'dicom' ? `series ${scan.dicom.chosen.id}` : 'image';
    process.stdout.write(`${out}: ${what}, ${scan.volume.dims.join(' × ')} voxels\n`);
  },
};
