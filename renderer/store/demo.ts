import type { OpenedFile } from '../../main/bridge-api';
import { parseManifest } from '../../src/manifest/manifest';
import type { FalciformDb } from './db';
import { commitImport, filesOfVisit } from './import';
import { readImportInWorker } from './import-client';
import { deletePatient, getSetting, setSetting } from './patients';

/**
 * On first start, with an empty store, imports the invented demo patients shipped with the app (built
 * into demo/ from demo-data/). They go through the same import as any folder, and are marked demo.
 * Runs once: after that, removing them is final.
 */
export async function offerDemoPatients(db: FalciformDb, base = './demo/'): Promise<string[]> {
  if (await getSetting(db, 'demoOffered')) return [];
  if ((await db.patients.count()) > 0) {
    await setSetting(db, 'demoOffered', true);
    return [];
  }
  const index = await fetch(`${base}index.json`);
  if (!index.ok) return []; // a build without demo data
  const { patients } = (await index.json()) as { patients: { id: string; manifest: string }[] };
  const files: OpenedFile[] = [];
  for (const p of patients) {
    const manifestText = await (await fetch(base + p.manifest)).text();
    const manifest = parseManifest(manifestText, p.manifest);
    const folder = p.manifest.slice(0, p.manifest.lastIndexOf('/') + 1);
    files.push({ relativePath: p.manifest, bytes: new TextEncoder().encode(manifestText) });
    for (const path of new Set(manifest.visits.flatMap(filesOfVisit))) {
      const res = await fetch(base + folder + path);
      if (!res.ok) throw new Error(`demo file ${folder}${path} could not be read (${res.status})`);
      files.push({ relativePath: folder + path, bytes: new Uint8Array(await res.arrayBuffer()) });
    }
  }
  const result = await commitImport(db, await readImportInWorker(files));
  await setSetting(db, 'demoOffered', true);
  return result.patients.map((p) => p.id);
}

/** Removes every demo patient and all its data (each deletion recorded like any other). */
export async function removeDemoPatients(db: FalciformDb): Promise<string[]> {
  const demo = (await db.patients.toArray()).filter((p) => p.demo).map((p) => p.id);
  for (const id of demo) await deletePatient(db, id);
  return demo;
}
