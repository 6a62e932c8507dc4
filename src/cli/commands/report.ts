import { randomBytes } from 'node:crypto';
import { mkdir, rename, stat, unlink } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { gzipSync } from 'node:zlib';
import { CAUTION } from '../../caution.js';
import { badFile } from '../../errors.js';
import { parseManifest } from '../../manifest/manifest.js';
import type { LoadedVisit } from '../../patient/load.js';
import { remnantForPatient } from '../../remnant/for-patient.js';
import { resectionPreset, RESECTION_PRESETS } from '../../remnant/resections.js';
import { boardDocument } from '../../report/board-html.js';
import { PAGE_SIZES, type PageSize } from '../../report/board-style.js';
import { caseFormCsv } from '../../report/case-form.js';
import { utf8 } from '../../report/csv.js';
import { reportVisit, type ReportInput } from '../../report/input.js';
import { keyedPseudonym, pseudonymNote, randomPseudonym, type Pseudonym } from '../../report/pseudonym.js';
import { customSchemeJson } from '../../report/scheme-export.js';
import { dateShiftDays, prepareReportExport } from '../../report/deidentify.js';
import { segmentMapFileName, segmentMapNifti } from '../../report/segment-map-export.js';
import { loadVisitWithMap } from '../../report/visit-maps.js';
import { maxLesionsOption, optionalOption, parseArgs, requireOption, UsageError } from '../args.js';
import type { Command } from '../commands.js';
import { readTextFile, writeFileAtomic } from '../node-io.js';
import { diskFiles, followupOfPatient } from '../patient.js';
import { embeddedFontCss } from '../fonts.js';
import { findBrowser, noBrowserReason, printToPdf } from '../print-pdf.js';
import { checkOutputFolder } from '../regular-file.js';

const USAGE =
  'falciform report MANIFEST --out DIR [--page A4|Letter] [--pseudonymise] [--pseudonym-key-file FILE | $FALCIFORM_PSEUDONYM_KEY] [--resection NAME] [--max-lesions N] [--no-pdf]';

export const report: Command = {
  summary: 'board summary (HTML, and PDF where Chromium or Chrome is installed), case-form CSV, segment maps as NIfTI',
  usage: USAGE,
  async run(argv) {
    const args = parseArgs(argv, ['out', 'page', 'pseudonym-key', 'pseudonym-key-file', 'resection', 'max-lesions'], ['pseudonymise', 'no-pdf']);
    if (args.positional.length !== 1) throw new UsageError(args.positional.length === 0 ? 'name the study manifest' : `unexpected argument "${args.positional[1]}"`);
    const manifestFile = args.positional[0];
    const outDir = requireOption(args, 'out');
    const page = pageOption(optionalOption(args, 'page'));
    const key = await pseudonymKey(optionalOption(args, 'pseudonym-key'), optionalOption(args, 'pseudonym-key-file'), args.options.has('pseudonymise'));
    const resection = optionalOption(args, 'resection');
    const maxLesions = maxLesionsOption(args);
    if (resection !== undefined && !resectionPreset(resection)) {
      throw new UsageError(`unknown resection "${resection}"; known: ${RESECTION_PRESETS.map((p) => p.id).join(', ')}`);
    }

    const manifest = parseManifest(await readTextFile(manifestFile), manifestFile);
    const source = diskFiles(manifestFile);
    await checkOutputFolder(outDir);
    try {
      await mkdir(outDir, { recursive: true });
    } catch (e) {
      throw badFile(outDir, `the output folder cannot be made: ${e instanceof Error ? e.message : String(e)}`);
    }

    const written: string[] = [];
    const notes: string[] = [];
    const put = async (name: string, bytes: Uint8Array) => {
      const path = join(outDir, name);
      await writeFileAtomic(path, bytes);
      written.push(path);
    };

    // One visit at a time: analyse it, write its segment map, keep only the analysis.
    const visits: LoadedVisit[] = [];
    for (const mv of manifest.visits) {
      const { visit, segmentMap } = await loadVisitWithMap(manifest, manifestFile, source, mv.id, { maxLesions, keyImages: true });
      visits.push(visit);
      await put(segmentMapFileName(mv.id), gzipSync(segmentMapNifti(segmentMap, mv.id, manifest.patient.demo === true)));
      const scheme = customSchemeJson(segmentMap.scheme);
      if (scheme) await put(`segments-${mv.id}.scheme.json`, utf8(scheme));
    }
    const followup = followupOfPatient({ manifest, manifestFile, visits });
    // The manifest's proposed resection, or the one named on the command line, on the latest visit.
    const latest = visits[visits.length - 1];
    const remnant = remnantForPatient(
      manifest,
      { id: latest.manifest.id, date: latest.manifest.date, volumetry: latest.volumetry, lesions: latest.analysis.lesions },
      { ...(resection ? { resection: { preset: resection } } : {}), tracks: followup.tracks },
    );

    const pseudonym: Pseudonym | null =
      key !== undefined ? await keyedPseudonym(manifest.patient.id, key) : args.options.has('pseudonymise') ? randomPseudonym() : null;
    const whole: ReportInput = {
      manifest,
      visits: visits.map(reportVisit),
      followup,
      remnant,
    };
    // Pseudonymised: dates shifted per patient, paths cut to the study, the id replaced everywhere.
    const shiftDays = pseudonym ? await dateShiftDays(pseudonym.id) : 0;
    const prepared = prepareReportExport(whole, { pseudonym, shiftDays, studyFolder: dirname(resolve(manifestFile)), madeAt: new Date() });
    const { input, summary } = prepared;
    if (prepared.note) notes.push(prepared.note);
    if (input.remnant) input.remnant.warnings.forEach((w) => notes.push(`remnant: ${w}`));
    const htmlPath = join(outDir, 'board-summary.html');
    await put('board-summary.html', utf8(boardDocument(summary, page, embeddedFontCss())));
    await put('case-form.csv', utf8(caseFormCsv(prepared.caseForm)));

    if (!args.options.has('no-pdf')) {
      const browser = findBrowser();
      if (!browser) {
        notes.push(`board-summary.pdf not made: ${noBrowserReason()}; open board-summary.html and print it.`);
      } else {
        const pdfPath = join(outDir, 'board-summary.pdf');
        const tmp = join(outDir, `.board-summary.${randomBytes(6).toString('hex')}.pdf`);
        try {
          await printToPdf(browser, htmlPath, tmp);
          await rename(tmp, pdfPath);
          written.push(pdfPath);
        } catch (e) {
          await unlink(tmp).catch(() => undefined);
          notes.push(`board-summary.pdf not made: ${e instanceof Error ? e.message : String(e)}; open board-summary.html and print it.`);
        }
      }
    }

    const lines = [`Wrote for patient ${summary.patient.label} (${page} page):`, ...written.map((p) => `  ${p}`)];
    if (pseudonym) lines.push(pseudonymNote(pseudonym));
    lines.push(...notes, CAUTION, '');
    process.stdout.write(lines.join('\n'));
  },
};

function pageOption(v: string | undefined): PageSize {
  if (v === undefined) return 'A4';
  const found = PAGE_SIZES.find((p) => p.toLowerCase() === v.toLowerCase());
  if (!found) throw new UsageError(`--page must be A4 or Letter, got "${v}"`);
  return found;
}


/**
 * The pseudonym key: from a file only its owner can read, or the FALCIFORM_PSEUDONYM_KEY environment
 * variable (with --pseudonymise); a key given on the command line still works but shows in the process list, so it warns.
 */
async function pseudonymKey(fromArgument: string | undefined, file: string | undefined, pseudonymise: boolean): Promise<string | undefined> {
  if (fromArgument !== undefined) {
    process.stderr.write('warning: --pseudonym-key shows in the process list to every user of this machine; use --pseudonym-key-file or FALCIFORM_PSEUDONYM_KEY\n');
    return fromArgument;
  }
  if (file !== undefined) {
    const mode = (await stat(file).catch(() => null))?.mode;
    if (mode !== undefined && (mode & 0o077) !== 0) throw badFile(file, 'the pseudonym key file is readable by other users; make it owner-only (chmod 600)');
    const key = (await readTextFile(file)).trim();
    if (!key) throw badFile(file, 'the pseudonym key file is empty');
    return key;
  }
  // The variable keys a pseudonymised report; it does not pseudonymise a report on its own.
  const env = process.env.FALCIFORM_PSEUDONYM_KEY;
  return pseudonymise && env ? env : undefined;
}
