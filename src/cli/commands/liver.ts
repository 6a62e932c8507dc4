import { CAUTION } from '../../caution.js';
import { growLiver } from '../../image/grow-liver.js';
import { roundTo } from '../../rounding.js';
import { numberOption, parseArgs, requireOption, UsageError } from '../args.js';
import type { Command } from '../commands.js';
import { loadVolume, saveVolume } from '../node-io.js';
import { parsePoint, takeRepeated } from '../point.js';

const USAGE = 'falciform liver --scan FILE --seed X,Y,Z --out FILE [--seed X,Y,Z …] [--not-liver X,Y,Z] [--opening-mm N] [--closing-mm N] [--json]';

export const liver: Command = {
  summary: 'liver mask grown from seed points (world RAS mm), on the scan\'s grid',
  usage: USAGE,
  async run(argv) {
    const { seeds, rest } = takeRepeated(argv, ['seed', 'not-liver']);
    const args = parseArgs(rest, ['scan', 'out', 'opening-mm', 'closing-mm'], ['json']);
    if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
    const scanFile = requireOption(args, 'scan');
    const outFile = requireOption(args, 'out');
    const seedsMm = (seeds.get('seed') ?? []).map((s) => parsePoint(s, 'seed'));
    if (seedsMm.length === 0) throw new UsageError('--seed is required');
    const notLiverMm = (seeds.get('not-liver') ?? []).map((s) => parsePoint(s, 'not-liver'));
    const params = {
      openingMm: numberOption(args, 'opening-mm', 5),
      closingMm: numberOption(args, 'closing-mm', 4),
    };
    const loaded = await loadVolume(scanFile);
    const result = growLiver({ scan: loaded.volume, seedsMm, notLiverMm, params });
    await saveVolume(outFile, result.mask, 'uint8');
    const warnings = [...loaded.warnings, ...result.warnings];
    const out = {
      out: outFile,
      volumeMl: roundTo(result.volumeMl, 3),
      voxels: result.voxelCount,
      noiseLevel: roundTo(result.noiseLevel, 2),
      params: { ...result.params, window: result.params.window.map((x) => roundTo(x, 2)), conductance: roundTo(result.params.conductance, 2) },
      warnings,
    };
    if (args.options.has('json')) {
      process.stdout.write(`${JSON.stringify(out)}\n`);
      return;
    }
    const p = out.params;
    process.stdout.write([
      `liver mask written to ${outFile}: ${out.volumeMl.toFixed(1)} mL`,
      `window ${p.window[0]}–${p.window[1]} (scan units), noise ${out.noiseLevel}, ${p.smoothingSteps} smoothing steps (κ ${p.conductance}), ` +
        `opening ${p.openingMm} mm, closing ${p.closingMm} mm, holes ${p.fillHoles ? 'filled' : 'kept'}`,
      '',
      CAUTION,
      '',
    ].join('\n'));
    for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
  },
};
