import { CAUTION } from '../../caution.js';
import { roundTo } from '../../rounding.js';
import { buildSegmentMap, PLANE_APPROXIMATION } from '../../segments/build.js';
import { parseLandmarks } from '../../segments/landmarks.js';
import { landmarkQc, parseReferenceSets, type LandmarkQc } from '../../segments/qc.js';
import { liverVolumeMl, segmentVolumes } from '../../segments/volumes.js';
import { UsageError, optionalOption, parseArgs, requireOption } from '../args.js';
import type { Command } from '../commands.js';
import { loadVolume, readTextFile, saveVolume } from '../node-io.js';
import { checkOutputFile } from '../regular-file.js';

/** QC numbers for output: correlations to 6 decimals, distances to 0.01 mm. */
function tidyQc(qc: LandmarkQc) {
  return {
    ...qc,
    correlation: roundTo(qc.correlation, 6),
    maxChangeMm: roundTo(qc.maxChangeMm, 2),
    correlationWithout: qc.correlationWithout === null ? null : roundTo(qc.correlationWithout, 6),
    correlationWithoutEach: Object.fromEntries(Object.entries(qc.correlationWithoutEach).map(([k, v]) => [k, roundTo(v, 6)])),
  };
}

export const segments: Command = {
  summary: 'build a segment map from a landmark set and a liver mask; segment volumes and landmark QC',
  usage: 'falciform segments --liver FILE --landmarks FILE --out FILE [--caudate FILE] [--split-iv] [--reference FILE] [--json]',
  async run(argv) {
    const args = parseArgs(argv, ['liver', 'landmarks', 'out', 'caudate', 'reference'], ['split-iv', 'json']);
    if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
    const liverFile = requireOption(args, 'liver');
    const landmarkFile = requireOption(args, 'landmarks');
    const outFile = requireOption(args, 'out');
    const caudateFile = optionalOption(args, 'caudate');
    const referenceFile = optionalOption(args, 'reference');
    const json = args.options.has('json');

    await checkOutputFile(outFile, [liverFile, landmarkFile, caudateFile, referenceFile]);
    // Read the small files first so a typo there fails before a large image is loaded.
    const landmarks = parseLandmarks(await readTextFile(landmarkFile), landmarkFile);
    const reference = referenceFile ? parseReferenceSets(await readTextFile(referenceFile), referenceFile) : undefined;
    const liver = await loadVolume(liverFile);
    const caudate = caudateFile ? await loadVolume(caudateFile) : undefined;
    const built = buildSegmentMap(liver.volume, landmarks, {
      caudate: caudate?.volume,
      splitIV: args.options.has('split-iv'),
      file: landmarkFile,
      liverFile,
      caudateFile,
    });
    await saveVolume(outFile, built.map.labels, 'uint8');

    const qc = reference ? tidyQc(landmarkQc(landmarks, [], reference)) : null;
    const warnings = [...liver.warnings, ...(caudate?.warnings ?? []), ...built.warnings];
    const volumes = segmentVolumes(built.map).map((v) => ({ segment: v.segment, volumeMl: roundTo(v.volumeMl, 3) }));
    const liverMl = roundTo(liverVolumeMl(built.map), 3);

    if (json) {
      process.stdout.write(`${JSON.stringify({ segments: volumes, liverVolumeMl: liverMl, qc, warnings, method: PLANE_APPROXIMATION, caution: CAUTION })}\n`);
      return;
    }
    const lines = [`segment map written to ${outFile}`, '', 'segment   volume (mL)'];
    for (const v of volumes) lines.push(`${v.segment.padEnd(9)} ${v.volumeMl.toFixed(1).padStart(11)}`);
    lines.push(`${'liver'.padEnd(9)} ${liverMl.toFixed(1).padStart(11)}`, '');
    if (qc) {
      lines.push(
        `landmark QC against ${qc.comparedWith} reference configuration${qc.comparedWith === 1 ? '' : 's'}: ` +
          `correlation ${qc.correlation.toFixed(4)}, largest distance change ${qc.maxChangeMm.toFixed(1)} mm ` +
          `(${qc.maxChangePair.join('–')})`,
        qc.worstLandmark
          ? `  check ${qc.worstLandmark}: without it the correlation is ${(qc.correlationWithout as number).toFixed(4)}`
          : '  no landmark stands out',
      );
    } else lines.push('landmark QC: not run (give --reference FILE with reference configurations)');
    lines.push('', CAUTION);
    process.stdout.write(`${lines.join('\n')}\n`);
    for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
  },
};
