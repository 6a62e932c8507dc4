import { CAUTION } from '../../caution.js';
import { growLesion } from '../../image/grow-lesion.js';
import { roundTo } from '../../rounding.js';
import { numberOption, parseArgs, requireOption, UsageError } from '../args.js';
import type { Command } from '../commands.js';
import { loadVolume, saveVolume } from '../node-io.js';
import { parsePoint } from '../point.js';

const USAGE = 'falciform lesion --scan FILE --liver FILE --seed X,Y,Z --out FILE [--max-radius-mm N] [--json]';

export const lesion: Command = {
  summary: 'one lesion\'s mask grown from a click inside the liver (world RAS mm), on the scan\'s grid, with its measures',
  usage: USAGE,
  async run(argv) {
    const args = parseArgs(argv, ['scan', 'liver', 'seed', 'out', 'max-radius-mm'], ['json']);
    if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
    const scanFile = requireOption(args, 'scan');
    const liverFile = requireOption(args, 'liver');
    const seedMm = parsePoint(requireOption(args, 'seed'), 'seed');
    const outFile = requireOption(args, 'out');
    const maxRadiusMm = numberOption(args, 'max-radius-mm', 40);
    const scan = await loadVolume(scanFile);
    const liver = await loadVolume(liverFile);
    const r = growLesion({ scan: scan.volume, liver: liver.volume, seedMm, params: { maxRadiusMm } });
    await saveVolume(outFile, r.mask, 'uint8');
    const l = r.lesion;
    const round3 = (p: readonly number[]) => p.map((x) => roundTo(x, 3));
    const out = {
      out: outFile,
      kind: r.kind,
      lesionValue: roundTo(r.lesionValue, 2),
      liverValue: roundTo(r.liverValue, 2),
      threshold: roundTo(r.threshold, 2),
      reachedLimit: r.reachedLimit,
      lesion: {
        centroidMm: round3(l.centroidMm),
        volumeMl: roundTo(l.volumeMl ?? 0, 3),
        longestAxialMm: roundTo(l.longestAxialMm, 2),
        shortAxisMm: roundTo(l.shortAxisMm, 2),
        longestAxialEndpointsMm: l.longestAxialEndpointsMm?.map(round3) ?? null,
        voxels: l.voxelCount,
      },
      params: r.params,
      warnings: [...scan.warnings, ...liver.warnings, ...r.warnings],
    };
    if (args.options.has('json')) {
      process.stdout.write(`${JSON.stringify(out)}\n`);
      return;
    }
    process.stdout.write([
      `lesion mask written to ${outFile}: ${r.kind}, ${out.lesion.volumeMl.toFixed(2)} mL, ` +
        `longest axial ${out.lesion.longestAxialMm.toFixed(1)} mm, short axis ${out.lesion.shortAxisMm.toFixed(1)} mm`,
      `click ${out.lesionValue}, liver around it ${out.liverValue}, threshold ${out.threshold} (scan units)`,
      '',
      CAUTION,
      '',
    ].join('\n'));
    for (const w of out.warnings) process.stderr.write(`warning: ${w}\n`);
  },
};
