import { isFalciformError, tooLarge } from '../../errors.js';
import { toRows } from '../../geometry/mat4.js';
import { optionalOption, type ParsedArgs } from '../args.js';
import { loadDicom } from '../dicom-io.js';
import { tidy, tidyMm, valueRange } from './inspect.js';

/**
 * `inspect` for a DICOM file or folder: the chosen series' volume facts as for NIfTI, every series found
 * with why it was or was not taken, and the header facts of the visit. Patient identity is printed
 * (this runs on the user's own machine, on their own files) but never written into any image.
 */
export async function inspectDicom(path: string, args: ParsedArgs, maxBytes: number): Promise<void> {
  let loaded;
  try {
    loaded = await loadDicom(path, { series: optionalOption(args, 'series'), maxBytes });
  } catch (e) {
    if (isFalciformError(e) && e.kind === 'too-large') throw tooLarge(e.file, `${e.problem}; raise it with --max-voxel-mib N`);
    throw e;
  }
  const { volume, facts, series, chosen, warnings } = loaded;
  const { min, max } = valueRange(volume);
  const out = {
    file: path,
    format: 'DICOM',
    dims: volume.dims,
    spacingMm: volume.spacingMm.map(tidyMm),
    datatype: volume.datatype,
    affine: toRows(volume.affine).map((row) => row.map(tidyMm)),
    affineSource: 'image plane',
    min: min === null ? null : tidy(min),
    max: max === null ? null : tidy(max),
    warnings,
    seriesUid: chosen.uid,
    study: {
      date: facts.studyDate ?? null,
      modality: facts.modality ?? null,
      seriesDescription: facts.seriesDescription ?? null,
      sliceThicknessMm: facts.sliceThicknessMm ?? null,
      contrastAgent: facts.contrastAgent ?? null,
      kvp: facts.kvp ?? null,
      manufacturer: facts.manufacturer ?? null,
      manufacturerModel: facts.manufacturerModel ?? null,
    },
    patient: { id: facts.patientId ?? null, name: facts.patientName ?? null, birthDate: facts.patientBirthDate ?? null },
    series,
  };
  if (args.options.has('json')) {
    process.stdout.write(`${JSON.stringify(out)}\n`);
    return;
  }
  const rows = out.affine.map((r) => `    [${r.map((x) => String(x).padStart(10)).join(' ')} ]`).join('\n');
  const list = series.map((s) => `  ${s.taken ? '*' : ' '} ${s.id}  ${s.number ?? ''} ${s.description ?? ''} — ${s.slices} slice(s): ${s.why}\n`).join('');
  process.stdout.write(
    `${path}\n` +
      `  DICOM ${facts.modality ?? ''} ${facts.studyDate ?? ''}, series ${chosen.id}: ${volume.dims.join(' × ')} voxels, ${volume.datatype}` +
      `${volume.slope !== 1 || volume.inter !== 0 ? `, scaled ×${tidy(volume.slope)} + ${tidy(volume.inter)}` : ''}\n` +
      `  spacing ${out.spacingMm.join(' × ')} mm; voxel to world (RAS mm) from the image plane:\n${rows}\n` +
      `  values ${out.min} to ${out.max}\n` +
      `  series found (* taken):\n${list}` +
      warnings.map((w) => `  note: ${w}\n`).join(''),
  );
}
