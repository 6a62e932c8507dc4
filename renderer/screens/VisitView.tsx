import { useCallback, useEffect, useMemo, useState } from 'react';
import { isFalciformError } from '../../src/errors';
import { showsViable } from '../../src/followup/followup';
import type { Vec3 } from '../../src/geometry/mat4';
import type { WindowPreset } from '../../src/model/records';
import { roundTo } from '../../src/rounding';
import { PLANE_APPROXIMATION } from '../../src/segments/build';
import { LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks';
import { usePatient } from '../analysis/PatientContext';
import { AnalysisStatus } from '../components/AnalysisStatus';
import { ConfirmDialog } from '../components/ConfirmDialog';
import { RouteLink } from '../components/RouteLink';
import { go } from '../navigation';
import { appDb } from '../store/db';
import { buildMapFromLandmarks, deleteMark, saveLandmarks, saveMark, saveMarkViable } from '../store/edits';
import { getSetting } from '../store/patients';
import { useStored } from '../store/use-stored';
import { markFromCaliper, nextMarkId } from '../viewer/caliper';
import { LandmarkPanel, type LandmarkMode, type ProposalState } from '../viewer/LandmarkPanel';
import { landmarkProblems, landmarkQcNotes, LANDMARK_LABELS, type LandmarkNotes } from '../viewer/landmark-qc';
import { diameterMarks, lesionOfDiameter } from '../viewer/diameter-marks';
import { GrowPanel, type GrowKind } from '../viewer/GrowPanel';
import { LesionPanel } from '../viewer/LesionPanel';
import { SegmentPanel } from '../viewer/SegmentPanel';
import { ComparePane } from '../viewer/ComparePane';
import { displayMmOfWorld, PLANES, sliceLayout, sliceStepTowardsPlus, worldOfDisplayMm, type Plane, type SliceLayout } from '../viewer/slice';
import { SliceViewer, type DraftCaliper, type Tool } from '../viewer/SliceViewer';
import { useVisitInputs } from '../viewer/useVisitInputs';
import { useVisitVolumes } from '../viewer/useVisitVolumes';
import { ViableLegend } from '../viewer/ViableLegend';
import { ViewerToolbar } from '../viewer/ViewerToolbar';
import type { VisitVolumes } from '../viewer/volume-messages';
import { CT_PRESETS, type WindowLevel } from '../viewer/window-level';

/** How the reader likes to look: kept while moving from visit to visit of the patient. */
interface ViewPrefs {
  plane: Plane;
  window: WindowLevel | null;
  showSegments: boolean;
  opacity: number;
  /** The viable-tumour mask drawn over the image, when the visit has one. */
  showViable: boolean;
}

/** One visit: its scan with the segment map and lesions, the lesion table, marks and landmarks. */
export function VisitView({ visitId, lesionId }: { visitId: string; lesionId?: string }) {
  const [prefs, setPrefs] = useState<ViewPrefs>({ plane: 'axial', window: null, showSegments: true, opacity: 0.35, showViable: true });
  // Keyed by visit: slices, drafts and the decoding worker start afresh for each visit.
  return <VisitScreen key={visitId} visitId={visitId} lesionId={lesionId} prefs={prefs} setPrefs={setPrefs} />;
}

type Slices = Record<Plane, number>;

function layoutsOf(v: VisitVolumes): Record<Plane, SliceLayout> {
  const out = {} as Record<Plane, SliceLayout>;
  for (const p of PLANES) out[p] = sliceLayout(v.dims, v.affine, v.spacingMm, p);
  return out;
}

/** A first landmark set for a visit that has none: another visit's, else spread over the liver's box. */
function firstLandmarks(others: LandmarkSet[], box: VisitVolumes['liverBoxMm']): LandmarkSet | null {
  if (others.length > 0) return others[others.length - 1];
  if (!box) return null;
  // Fractions of the box, +x being the patient's right: rough anatomical places the reader then corrects.
  const at = (fx: number, fy: number, fz: number): Vec3 => [0, 1, 2].map((c) => box.min[c] + [fx, fy, fz][c] * (box.max[c] - box.min[c])) as unknown as Vec3;
  return {
    points: {
      ivc_superior: at(0.4, 0.25, 0.9),
      ivc_inferior: at(0.4, 0.25, 0.15),
      right_hepatic_vein: at(0.75, 0.45, 0.85),
      middle_hepatic_vein: at(0.45, 0.7, 0.8),
      umbilical_fissure: at(0.15, 0.75, 0.6),
      portal_bifurcation: at(0.45, 0.45, 0.5),
    },
  };
}

const message = (e: unknown) => (isFalciformError(e) ? e.problem : e instanceof Error ? e.message : String(e));

function VisitScreen({ visitId, lesionId, prefs, setPrefs }: {
  visitId: string; lesionId?: string; prefs: ViewPrefs; setPrefs: (f: (p: ViewPrefs) => ViewPrefs) => void;
}) {
  const { patient, state, analysis, reanalyse } = usePatient();
  const db = appDb();
  const [volumeRevision, setVolumeRevision] = useState(0);
  const [inputRevision, setInputRevision] = useState(0);
  const { state: loading, volumes } = useVisitVolumes(patient.id, visitId, volumeRevision);
  const inputs = useVisitInputs(patient.id, visitId, inputRevision);
  const [slices, setSlices] = useState<Slices | null>(null);
  const [tool, setTool] = useState<Tool>('look');
  const [selected, setSelected] = useState<string | null>(lesionId ?? null);
  const [draft, setDraft] = useState<DraftCaliper | null>(null);
  const [landmarkDraft, setLandmarkDraft] = useState<LandmarkSet | null>(null);
  const [hint, setHint] = useState<string | null>(null);
  const [notice, setNotice] = useState<{ kind: 'done' | 'problem'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const [confirm, setConfirm] = useState<{ kind: 'delete'; id: string } | { kind: 'build'; set: LandmarkSet } | null>(null);
  // A landmark move waits for both the rebuilt map and the new analysis (new objects, not just "ready").
  const [rebuilding, setRebuilding] = useState<{ label: string; volumes: VisitVolumes | null; analysis: unknown } | null>(null);
  const [landmarkStatus, setLandmarkStatus] = useState<string | null>(null);
  const [placing, setPlacing] = useState<LandmarkName | null>(null);
  const [growPick, setGrowPick] = useState<GrowKind | null>(null);
  const [growSeed, setGrowSeed] = useState<{ kind: GrowKind; p: Vec3; path?: Vec3[] } | null>(null);
  const [proposed, setProposed] = useState<ProposalState | null>(null);
  const [compareId, setCompareId] = useState<string | null>(null);

  const result = analysis?.visits.find((v) => v.id === visitId) ?? null;
  const record = inputs?.record ?? null;
  const layouts = useMemo(() => (volumes ? layoutsOf(volumes) : null), [volumes]);
  const layout = layouts?.[prefs.plane] ?? null;
  const marks = useMemo(() => inputs?.marks ?? [], [inputs]);
  // Mask lesions' measured diameters are drawn beside the marks' calipers.
  const drawnMarks = useMemo(() => [...marks, ...diameterMarks(result?.analysis.lesions ?? [])], [marks, result]);

  const storedPresets = useStored(() => getSetting(db, 'windowPresets'), [db]);
  const presets: readonly WindowPreset[] = storedPresets?.length ? storedPresets : CT_PRESETS;

  const jumpTo = useCallback((p: Vec3) => {
    if (!layouts || !volumes) return;
    const out = {} as Slices;
    for (const plane of PLANES) {
      const l = layouts[plane];
      out[plane] = Math.min(l.depth - 1, Math.max(0, Math.round(displayMmOfWorld(l, volumes.inverse, p).slice)));
    }
    setSlices(out);
  }, [layouts, volumes]);

  // First view of the visit: the chosen lesion if any, else the middle of the scan; a CT opens in the liver window.
  useEffect(() => {
    if (!volumes || !layouts || slices) return;
    const target = lesionId ? result?.analysis.lesions.find((l) => l.id === lesionId) : undefined;
    if (target) jumpTo(target.centroidMm);
    else if (!lesionId || analysis) {
      setSlices({ axial: layouts.axial.depth >> 1, coronal: layouts.coronal.depth >> 1, sagittal: layouts.sagittal.depth >> 1 });
    }
    if (!prefs.window) {
      const wl = volumes.values.looksLikeCt && presets.length ? { centre: presets[0].centre, width: presets[0].width } : volumes.values.auto;
      setPrefs((p) => ({ ...p, window: wl }));
    }
  }, [volumes, layouts, slices, lesionId, result, analysis, jumpTo, prefs.window, presets, setPrefs]);

  // After a landmark move: say so once the rebuilt map and the new analysis are both in.
  useEffect(() => {
    if (rebuilding && volumes !== rebuilding.volumes && analysis !== rebuilding.analysis && loading.status === 'ready' && state.status === 'ready') {
      setLandmarkStatus(`Segment map rebuilt after moving the ${rebuilding.label}.`);
      setRebuilding(null);
    }
  }, [rebuilding, volumes, analysis, loading.status, state.status]);

  const slice = layout && slices ? slices[prefs.plane] : 0;
  const setSlice = useCallback((s: number) => setSlices((old) => (old ? { ...old, [prefs.plane]: s } : old)), [prefs.plane]);
  const step = useCallback((n: number) => {
    if (!layout) return;
    setSlices((old) => (old ? { ...old, [prefs.plane]: Math.min(layout.depth - 1, Math.max(0, old[prefs.plane] + n * sliceStepTowardsPlus(layout))) } : old));
  }, [layout, prefs.plane]);

  // Another visit beside this one: both must be in the follow-up, whose alignments relate their worlds.
  const followed = analysis?.followup.visits ?? [];
  const currentFollowup = followed.find((v) => v.id === visitId) ?? null;
  const compare = currentFollowup ? followed.find((v) => v.id === compareId && v.id !== visitId) ?? null : null;
  const focusMm: Vec3 | null = layout && volumes && slices
    ? worldOfDisplayMm(layout, volumes.affine, (layout.width * layout.colMm) / 2, (layout.height * layout.rowMm) / 2, slice) : null;
  const focusOn = useCallback((p: Vec3) => {
    if (!layout || !volumes) return;
    setSlices((old) => {
      if (!old) return old;
      const now = old[prefs.plane];
      const want = displayMmOfWorld(layout, volumes.inverse, p).slice;
      // A finer-sliced visit beside this one still moves this one, a slice at a time.
      let s = Math.round(want);
      if (s === now && Math.abs(want - now) > 1e-6) s = now + Math.sign(want - now);
      return { ...old, [prefs.plane]: Math.min(layout.depth - 1, Math.max(0, s)) };
    });
  }, [layout, volumes, prefs.plane]);
  const tracksByVisit = useMemo(() => {
    const out = new Map<string, Map<string, string>>();
    for (const t of analysis?.followup.tracks ?? []) {
      for (const [v, lesion] of Object.entries(t.lesions)) {
        if (!out.has(v)) out.set(v, new Map());
        out.get(v)!.set(lesion, t.id);
      }
    }
    return out;
  }, [analysis]);
  const trackIn = (v: string) => (lesionId: string) => tracksByVisit.get(v)?.get(lesionId);

  const visitIds = inputs?.visitIds ?? [];
  const at = visitIds.indexOf(visitId);
  const previous = at > 0 ? visitIds[at - 1] : null;
  const next = at >= 0 && at < visitIds.length - 1 ? visitIds[at + 1] : null;
  const openVisit = useCallback((id: string | null) => { if (id) go({ screen: 'visit', patientId: patient.id, visitId: id }); }, [patient.id]);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement | null;
      if (e.altKey || e.ctrlKey || e.metaKey || t?.closest('input, textarea, select, dialog')) return;
      const handled = (() => {
        switch (e.key) {
          case 'ArrowUp': step(1); return true;
          case 'ArrowDown': step(-1); return true;
          case 'PageUp': step(5); return true;
          case 'PageDown': step(-5); return true;
          case '[': openVisit(previous); return true;
          case ']': openVisit(next); return true;
          case 'o': case 'O': setPrefs((p) => ({ ...p, showSegments: !p.showSegments })); return true;
          case 'v': case 'V': setPrefs((p) => ({ ...p, showViable: !p.showViable })); return true;
          case 'Escape': setDraft(null); setTool('look'); setHint(null); setPlacing(null); setGrowPick(null); return true;
          default: return false;
        }
      })();
      if (handled) e.preventDefault();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [step, openVisit, previous, next, setPrefs]);

  /** Runs one store edit; a refusal shows in place and changes nothing. */
  const edit = async (work: () => Promise<string | null>, after: { volumes?: boolean } = {}) => {
    setBusy(true);
    setNotice(null);
    try {
      const done = await work();
      setInputRevision((n) => n + 1);
      if (after.volumes) setVolumeRevision((n) => n + 1);
      reanalyse();
      if (done) setNotice({ kind: 'done', text: done });
      return true;
    } catch (e) {
      setNotice({ kind: 'problem', text: message(e) });
      return false;
    } finally {
      setBusy(false);
    }
  };

  const takenIds = [...(result?.analysis.lesions.map((l) => l.id) ?? []), ...marks.map((m) => m.id)];
  const draftId = nextMarkId(takenIds);

  const saveDraft = async (shortAxisMm: number, viableAxialMm?: number) => {
    if (!draft) return;
    const mark = markFromCaliper(draftId, draft.a, draft.b, shortAxisMm, viableAxialMm);
    if (await edit(async () => { await saveMark(db, patient.id, visitId, mark, 'create'); return `Lesion ${mark.id} added; the analysis is updating.`; })) {
      setDraft(null);
      setSelected(mark.id);
      setTool('look');
    }
  };
  const moveMarkEnd = (id: string, end: 0 | 1, p: Vec3) => {
    const m = marks.find((k) => k.id === id);
    if (!m?.endpointsMm) return;
    const ends: [Vec3, Vec3] = end === 0 ? [p, m.endpointsMm[1]] : [m.endpointsMm[0], p];
    const moved = markFromCaliper(id, ends[0], ends[1], m.shortAxisMm, m.viableAxialMm);
    void edit(async () => { await saveMark(db, patient.id, visitId, moved, 'update'); return `Caliper of ${id} moved: longest ${moved.longestAxialMm.toFixed(1)} mm.`; });
  };
  const setShortAxis = (id: string, shortAxisMm: number) => {
    const m = marks.find((k) => k.id === id);
    if (!m) return;
    void edit(async () => { await saveMark(db, patient.id, visitId, { ...m, shortAxisMm: roundTo(shortAxisMm, 1) }, 'update'); return `Short axis of ${id} saved.`; });
  };

  const setViable = (id: string, viableAxialMm: number | null) => {
    void edit(async () => {
      await saveMarkViable(db, patient.id, visitId, id, viableAxialMm);
      return viableAxialMm === null ? `Viable diameter of ${id} cleared.` : `Viable diameter of ${id} saved: ${viableAxialMm.toFixed(1)} mm.`;
    });
  };
  const visitFollowup = analysis?.followup.visits.find((v) => v.id === visitId);
  const viableColumn = analysis && showsViable(analysis.followup) ? (visitFollowup?.viableAxialMm ?? {}) : null;

  const landmarkMode: LandmarkMode = record && !record.volumes.includes('segments') && !record.volumes.includes('liver') ? 'no-liver'
    : !record || !record.volumes.includes('segments') ? 'built' : record.volumes.includes('liver') ? 'imported-with-liver' : 'imported';
  // Landmarks carried from an earlier visit: on screen only (never stored or analysed) until confirmed.
  const proposal = inputs && !inputs.landmarks && landmarkMode === 'built' ? volumes?.proposal ?? null : null;
  useEffect(() => {
    setProposed(proposal ? { proposal, moved: [] } : null);
    if (proposal) setTool('landmarks');
  }, [proposal]);
  const shownLandmarks = landmarkDraft ?? inputs?.landmarks ?? proposed?.proposal.set ?? null;
  const problems = useMemo(() => (shownLandmarks ? landmarkProblems(shownLandmarks) : null), [shownLandmarks]);
  const qc = useMemo(
    () => (shownLandmarks && !problems && inputs ? landmarkQcNotes(shownLandmarks, inputs.otherLandmarks) : null),
    [shownLandmarks, problems, inputs],
  );
  const notesOnImage = useMemo(() => {
    const out: Partial<Record<LandmarkName, string[]>> = {};
    for (const notes of [problems, qc] as (LandmarkNotes | null)[]) {
      for (const name of LANDMARK_NAMES) if (notes?.byLandmark[name]) (out[name] ??= []).push(...notes.byLandmark[name]);
    }
    return out;
  }, [problems, qc]);

  const confirmProposal = (state: ProposalState) => {
    const { proposal: from, moved } = state;
    void edit(async () => {
      await buildMapFromLandmarks(db, patient.id, visitId, from.set, {
        proposedFrom: from.fromVisit, alignment: from.method, residualMm: from.residualMm === null ? null : roundTo(from.residualMm, 2),
        rotationDeg: roundTo(from.rotationDeg, 2), movedByReader: [...moved],
      });
      return `Landmarks confirmed (${moved.length} of ${LANDMARK_NAMES.length} moved); the segment map is being built from them.`;
    }, { volumes: true }).then((ok) => { if (ok) setProposed(null); });
  };

  const moveLandmark = async (name: LandmarkName, p: Vec3) => {
    setPlacing(null);
    setHint(null);
    if (!shownLandmarks) return;
    const set: LandmarkSet = { points: { ...shownLandmarks.points, [name]: p } };
    setLandmarkStatus(null);
    if (proposed && !inputs?.landmarks) {
      // A moved proposed point counts as confirmed; once every point is, the set is stored.
      const moved = proposed.moved.includes(name) ? proposed.moved : [...proposed.moved, name];
      const next: ProposalState = { proposal: { ...proposed.proposal, set }, moved };
      setProposed(next);
      if (moved.length === LANDMARK_NAMES.length && !landmarkProblems(set)) confirmProposal(next);
      return;
    }
    if (landmarkProblems(set)) {
      // Kept on screen, not stored: a set the plane rule refuses would stop the patient's analysis.
      setLandmarkDraft(set);
      return;
    }
    const label = LANDMARK_LABELS[name].full.toLowerCase();
    if (await edit(async () => { await saveLandmarks(db, patient.id, visitId, set); return null; }, { volumes: true })) {
      setLandmarkDraft(null);
      setRebuilding({ label, volumes, analysis });
      setLandmarkStatus(`Rebuilding the segment map after moving the ${label}…`);
    }
  };
  const startBuilding = () => {
    const set = firstLandmarks(inputs?.otherLandmarks.map((o) => o.set) ?? [], volumes?.liverBoxMm ?? null);
    if (!set) setNotice({ kind: 'problem', text: 'The liver mask holds no voxels, so there is nowhere to place landmarks.' });
    else setConfirm({ kind: 'build', set });
  };

  const visitDate = result?.date ?? record?.date;
  // From what is stored now: a marks file whose last mark was deleted no longer adds "manual marks".
  const lesionSource = record ? [record.volumes.includes('lesions') ? 'lesion mask' : null, marks.length > 0 ? 'manual marks' : null].filter(Boolean).join(' + ') : '';
  const canMark = prefs.plane === 'axial' && !!volumes;

  return (
    <div className="visit-view" data-testid="visit-view">
      <nav className="crumbs">
        <RouteLink to={{ screen: 'patients' }}>All patients</RouteLink>
        {' › '}
        <RouteLink to={{ screen: 'patient', patientId: patient.id }}>{patient.id}</RouteLink>
        {' › '}
        <span>visit {visitId}</span>
      </nav>
      <header className="visit-header">
        <h2 data-testid="visit-title">Visit {visitId}{visitDate ? <span className="visit-date"> · {visitDate}</span> : null}</h2>
        {record && (
          <span className="visit-facts">
            Segment map {landmarkMode === 'no-liver' || (landmarkMode === 'built' && !inputs?.landmarks) ? 'none yet' : landmarkMode === 'built' ? <>built from landmarks <span className="approx" data-testid="plane-approximation" title={PLANE_APPROXIMATION}>(flat-plane approximation)</span></> : 'imported'} · lesions from <span data-testid="lesion-source">{lesionSource || 'nothing'}</span>
          </span>
        )}
        {record?.dicom && (
          <span className="visit-facts" data-testid="dicom-facts" title={`DICOM series ${record.dicom.seriesUid}`}>
            Scan from DICOM: {[record.dicom.modality, record.dicom.seriesDescription,
              record.dicom.sliceThicknessMm !== undefined ? `${record.dicom.sliceThicknessMm} mm slices` : undefined,
              record.dicom.kvp !== undefined ? `${record.dicom.kvp} kVp` : undefined,
              record.dicom.contrastAgent ? `contrast ${record.dicom.contrastAgent}` : 'no contrast agent recorded',
              record.dicom.manufacturerModel].filter(Boolean).join(' · ')}
          </span>
        )}
        <span className="visit-nav">
          <label className="compare-choice">
            Beside:{' '}
            <select value={compare?.id ?? ''} onChange={(e) => setCompareId(e.target.value || null)} disabled={!currentFollowup} data-testid="compare-visit"
              title={currentFollowup ? 'Show another visit beside this one, at the same anatomical place' : 'This visit is not in the analysis yet'}>
              <option value="">no other visit</option>
              {followed.filter((v) => v.id !== visitId).map((v) => <option key={v.id} value={v.id}>visit {v.id} · {v.date}</option>)}
            </select>
          </label>
          <button type="button" onClick={() => openVisit(previous)} disabled={!previous} data-testid="previous-visit" title="Previous visit ( [ )">‹ {previous ?? 'first visit'}</button>
          <button type="button" onClick={() => openVisit(next)} disabled={!next} data-testid="next-visit" title="Next visit ( ] )">{next ?? 'last visit'} ›</button>
        </span>
      </header>
      {/* One reserved line for progress and edit messages, so the images do not jump when they come and go. */}
      <div className="visit-status">
        <AnalysisStatus state={state} />
        {analysis && !result && state.status === 'ready' && (record && !record.volumes.includes('segments') && !inputs?.landmarks
          ? <p className="notice" role="status" data-testid="visit-waiting">Visit {visitId} has no segment map yet, so it is left out of the analysis: {landmarkMode === 'no-liver' ? 'grow the liver from a click, then' : ''} confirm or place its landmarks.</p>
          : <p className="notice error" role="alert">Visit {visitId} is not among {patient.id}&apos;s visits.</p>)}
        {notice && (
          <p className={`notice ${notice.kind === 'done' ? 'done' : 'problem'}`} role={notice.kind === 'problem' ? 'alert' : 'status'} data-testid="edit-notice">{notice.text}</p>
        )}
      </div>
      <div className="visit-layout">
        <section className="viewer-pane" aria-label="Images">
          <ViewerToolbar
            plane={prefs.plane}
            onPlane={(plane) => setPrefs((p) => ({ ...p, plane }))}
            presets={presets}
            auto={volumes?.values.auto ?? null}
            window={prefs.window}
            onWindow={(w) => setPrefs((p) => ({ ...p, window: w }))}
            tool={tool}
            onTool={(t) => { setTool(t); setHint(t === 'mark' ? 'Drag across the lesion along its longest axial diameter.' : null); if (t !== 'mark') setDraft(null); }}
            canMark={canMark}
            canMoveLandmarks={landmarkMode === 'built' && !!shownLandmarks}
          />
          {loading.status === 'running' && (
            <div className="analysis-progress" role="status" data-testid="volumes-progress">
              <progress max={loading.total} value={loading.done} />
              <span>{volumes ? 'Updating the images: ' : ''}{loading.step}… ({loading.done} of {loading.total})</span>
            </div>
          )}
          {loading.status === 'failed' && <p className="notice problem" role="alert" data-testid="volumes-error">The images could not be shown: {loading.message}</p>}
          <div className={compare ? 'compare-panes' : 'single-pane'}>
          <div className="compare-pane">
          {compare && <p className="pane-title"><strong>Visit {visitId}</strong> · {visitDate} · this visit</p>}
          {volumes && layout && slices && prefs.window ? (
            <SliceViewer
              volumes={volumes}
              layout={layout}
              slice={slice}
              onSlice={setSlice}
              window={prefs.window}
              onWindow={(w) => setPrefs((p) => ({ ...p, window: w }))}
              showSegments={prefs.showSegments}
              showViable={prefs.showViable}
              opacity={prefs.opacity}
              tool={tool}
              marks={drawnMarks}
              selected={selected}
              onSelect={(id) => setSelected(lesionOfDiameter(id))}
              draft={draft}
              onDraft={setDraft}
              onMoveMarkEnd={moveMarkEnd}
              landmarks={shownLandmarks}
              landmarkNotes={notesOnImage}
              onMoveLandmark={(name, p) => void moveLandmark(name, p)}
              proposed={proposed ? LANDMARK_NAMES.filter((n) => !proposed.moved.includes(n)) : undefined}
              placing={placing}
              onHint={setHint}
              trackOf={compare ? trackIn(visitId) : undefined}
              onStroke={growPick?.startsWith('brush') ? (path) => setGrowSeed({ kind: growPick, p: path[0], path }) : undefined}
              onPick={growPick ? (p) => {
                setGrowSeed({ kind: growPick, p });
                // The brush stays in hand for the next dab; a grower takes one click.
                if (!growPick.startsWith('brush')) { setGrowPick(null); setHint(null); }
              } : undefined}
            />
          ) : (
            loading.status !== 'failed' && <div className="slice-placeholder" aria-hidden="true" />
          )}
          </div>
          {compare && currentFollowup && focusMm && prefs.window && (
            <ComparePane
              patientId={patient.id}
              other={compare}
              otherResult={analysis?.visits.find((v) => v.id === compare.id) ?? null}
              current={currentFollowup}
              plane={prefs.plane}
              focusMm={focusMm}
              onFocus={focusOn}
              window={prefs.window}
              onWindow={(w) => setPrefs((p) => ({ ...p, window: w }))}
              showSegments={prefs.showSegments}
              showViable={prefs.showViable}
              opacity={prefs.opacity}
              trackOf={trackIn(compare.id)}
            />
          )}
          </div>
          {hint && <p className="viewer-hint" role="status" data-testid="viewer-hint">{hint}</p>}
          <p className="keys" data-testid="key-help">
            <kbd>↑</kbd>/<kbd>↓</kbd> or wheel: slice · <kbd>PgUp</kbd>/<kbd>PgDn</kbd>: 5 slices · <kbd>[</kbd>/<kbd>]</kbd>: previous/next visit ·
            {' '}<kbd>O</kbd>: segment colours ·{volumes?.viable ? <> <kbd>V</kbd>: viable tumour ·</> : null} drag: pan · <kbd>Ctrl</kbd>+wheel: zoom · right-drag: window · double-click: fit
          </p>
        </section>
        <aside className="visit-side" aria-label="Visit details">
          <SegmentPanel
            volumes={volumes}
            segmentVolumes={result?.analysis.segments ?? null}
            liverVolumeMl={result?.analysis.liverVolumeMl ?? null}
            show={prefs.showSegments}
            onShow={(showSegments) => setPrefs((p) => ({ ...p, showSegments }))}
            opacity={prefs.opacity}
            onOpacity={(opacity) => setPrefs((p) => ({ ...p, opacity }))}
          />
          {volumes?.viable && <ViableLegend show={prefs.showViable} onShow={(showViable) => setPrefs((p) => ({ ...p, showViable }))} />}
          <LesionPanel
            lesions={result?.analysis.lesions ?? null}
            marks={marks}
            selected={selected}
            onSelect={(id) => {
              setSelected(id);
              const l = result?.analysis.lesions.find((k) => k.id === id);
              if (l) { jumpTo(l.centroidMm); setPrefs((p) => (p.plane === 'axial' ? p : { ...p, plane: 'axial' })); }
            }}
            draft={draft}
            draftId={draftId}
            viable={viableColumn}
            onSaveDraft={(s, v) => void saveDraft(s, v)}
            onCancelDraft={() => setDraft(null)}
            onShortAxis={setShortAxis}
            onViable={setViable}
            onDelete={(id) => setConfirm({ kind: 'delete', id })}
            busy={busy}
          />
          <LandmarkPanel
            mode={landmarkMode}
            landmarks={shownLandmarks}
            unsaved={landmarkDraft !== null}
            problems={problems}
            qc={qc}
            onShow={(name) => { if (shownLandmarks) { jumpTo(shownLandmarks.points[name]); setTool('landmarks'); } }}
            placing={placing}
            onPlace={(name) => {
              setPlacing(name);
              setTool('landmarks');
              setHint(name ? `Click where the ${LANDMARK_LABELS[name].full.toLowerCase()} lies, on any plane and slice (Esc cancels).` : null);
            }}
            onRevert={() => setLandmarkDraft(null)}
            onStartBuilding={startBuilding}
            busy={busy}
            status={landmarkStatus}
            proposed={proposed}
            onConfirmProposal={() => { if (proposed) confirmProposal(proposed); }}
          />
          <GrowPanel
            patientId={patient.id}
            visitId={visitId}
            picking={growPick}
            onPicking={(k) => {
              setGrowPick(k);
              setHint(k === 'liver' ? 'Click inside plain liver tissue, away from vessels and lesions (Esc cancels).'
                : k === 'lesion' ? 'Click in the middle of the lesion (Esc cancels).'
                  : k ? `Click or drag on any plane to ${k === 'brush-add' ? 'add' : 'erase'} balls of the brush radius; each click or stroke is stored as one change and can be undone (Esc ends).` : null);
            }}
            seed={growSeed}
            onAccepted={(text) => void edit(async () => text, { volumes: true })}
            busy={busy}
          />
          {(inputs?.problem || (result && result.warnings.length > 0) || (volumes && volumes.warnings.length > 0)) && (
            <details className="warnings side-section">
              <summary>Warnings</summary>
              <ul>
                {inputs?.problem && <li>{inputs.problem}</li>}
                {[...new Set([...(result?.warnings ?? []), ...(volumes?.warnings ?? [])])].map((w) => <li key={w}>{w}</li>)}
              </ul>
            </details>
          )}
        </aside>
      </div>
      {confirm?.kind === 'delete' && (
        <ConfirmDialog
          title={`Delete mark ${confirm.id}?`}
          confirmLabel="Delete mark"
          danger
          testId="delete-mark-dialog"
          onCancel={() => setConfirm(null)}
          onConfirm={() => {
            const id = confirm.id;
            setConfirm(null);
            void edit(async () => { await deleteMark(db, patient.id, visitId, id); return `Mark ${id} deleted (kept in the edit trail).`; }).then(() => setSelected(null));
          }}
        >
          <p>The lesion {confirm.id} is removed from visit {visitId}, and its lesion track loses this visit. The edit trail keeps the mark as it was.</p>
        </ConfirmDialog>
      )}
      {confirm?.kind === 'build' && (
        <ConfirmDialog
          title="Build this visit's segment map from landmarks?"
          confirmLabel="Place landmarks"
          testId="build-map-dialog"
          onCancel={() => setConfirm(null)}
          onConfirm={() => {
            const set = confirm.set;
            setConfirm(null);
            void edit(async () => {
              await buildMapFromLandmarks(db, patient.id, visitId, set);
              return 'Landmarks placed at first guesses and the map built from them: move each point to its place on this scan.';
            }, { volumes: true }).then((ok) => { if (ok) setTool('landmarks'); });
          }}
        >
          <p>The imported segment map is removed from visit {visitId} and a map is built from six landmarks inside the liver mask.</p>
          <p>The landmarks start {(inputs?.otherLandmarks.length ?? 0) > 0 ? 'where they are at another visit' : 'at rough places in the liver'}; move each one to its place on this scan.</p>
          <p className="hint">A backup made before keeps the imported map. The change is kept in the edit trail.</p>
        </ConfirmDialog>
      )}
    </div>
  );
}
