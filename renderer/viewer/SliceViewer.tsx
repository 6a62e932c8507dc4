import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState, type PointerEvent as ReactPointerEvent, type ReactNode } from 'react';
import { flushSync } from 'react-dom';
import type { Vec3 } from '../../src/geometry/mat4';
import { distance } from '../../src/geometry/vec3';
import type { Mark } from '../../src/lesions/marks';
import { LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks';
import { shortAxisEnds, shortAxisOfDrag } from './caliper';
import { composeSlice, lesionOutlines, maskRuns, type LesionOutline } from './compose';
import { LANDMARK_LABELS } from './landmark-qc';
import { segmentOfCode } from './palette';
import { displayMmOfWorld, extractSlice, PLANE_LABELS, sliceStepTowardsPlus, voxelIndexOfDisplay, worldOfDisplayMm, type SliceLayout } from './slice';
import { fitView, toDisplayMm, toScreen, zoomAt, type View } from './view-transform';
import type { VisitVolumes } from './volume-messages';
import { dragWindow, type WindowLevel } from './window-level';

export type Tool = 'look' | 'mark' | 'landmarks';

/** A caliper being drawn: the long axis, then (second drag) the short axis. */
export interface DraftCaliper {
  a: Vec3;
  b: Vec3;
  shortMm: number | null;
}

interface Props {
  volumes: VisitVolumes;
  layout: SliceLayout;
  slice: number;
  onSlice(slice: number): void;
  window: WindowLevel;
  onWindow(wl: WindowLevel): void;
  showSegments: boolean;
  opacity: number;
  /** Draw the viable-tumour mask (hatched, dashed outline) when the visit has one. */
  showViable: boolean;
  tool: Tool;
  marks: Mark[];
  selected: string | null;
  onSelect(id: string | null): void;
  draft: DraftCaliper | null;
  onDraft(d: DraftCaliper | null): void;
  onMoveMarkEnd(id: string, end: 0 | 1, p: Vec3): void;
  landmarks: LandmarkSet | null;
  landmarkNotes: Partial<Record<LandmarkName, string[]>>;
  onMoveLandmark(name: LandmarkName, p: Vec3): void;
  /** Landmarks still only proposed (carried from an earlier visit, not yet confirmed): drawn apart. */
  proposed?: readonly LandmarkName[];
  /** A landmark waiting to be put where the reader clicks next. */
  placing: LandmarkName | null;
  onHint(text: string | null): void;
  /** When given, a click picks a world point (a seed for growing) instead of the tool's action. */
  onPick?(p: Vec3): void;
  /** When given, a drag paints a stroke: its world points, from press to release, go here as one. */
  onStroke?(pathMm: Vec3[]): void;
  /** The lesion track of a lesion id, shown before the id so two visits side by side label alike. */
  trackOf?(lesionId: string): string | undefined;
}

const ORIENTATION: Record<SliceLayout['plane'], { left: string; right: string; top: string; bottom: string }> = {
  axial: { left: 'R', right: 'L', top: 'A', bottom: 'P' },
  coronal: { left: 'R', right: 'L', top: 'S', bottom: 'I' },
  sagittal: { left: 'A', right: 'P', top: 'S', bottom: 'I' },
};

/** The viable overlay's hatching: one white diagonal per 6 px tile, made once. */
let hatchTile: HTMLCanvasElement | null = null;
function hatch(): HTMLCanvasElement {
  if (hatchTile) return hatchTile;
  hatchTile = document.createElement('canvas');
  hatchTile.width = 6;
  hatchTile.height = 6;
  const g = hatchTile.getContext('2d')!;
  g.strokeStyle = 'rgba(255,255,255,0.85)';
  g.lineWidth = 1.5;
  g.beginPath();
  g.moveTo(-1, 7); g.lineTo(7, -1);
  g.moveTo(5, 7); g.lineTo(7, 5);
  g.moveTo(-1, 1); g.lineTo(1, -1);
  g.stroke();
  return hatchTile;
}

const fmt = (x: number) => (Math.abs(x) < 0.05 ? '0.0' : x.toFixed(1));

type Drag =
  | { kind: 'pan'; x: number; y: number; panX: number; panY: number; moved: boolean }
  | { kind: 'window'; x: number; y: number; start: WindowLevel }
  | { kind: 'caliper'; from: Vec3; to: Vec3; short: boolean }
  | { kind: 'landmark'; name: LandmarkName; xMm: number; yMm: number; slice: number }
  | { kind: 'mark-end'; id: string; end: 0 | 1; xMm: number; yMm: number; slice: number }
  | { kind: 'stroke'; points: Vec3[] };

interface Readout {
  world: Vec3;
  value: number | null;
  segment: string | null;
  lesion: string | null;
}

/**
 * One plane of a visit on a canvas: the scan through the window, the segment map as a colour wash,
 * lesion outlines with their ids, manual marks with their calipers, and (when editing them) the
 * landmarks as handles. Wheel scrolls slices, Ctrl+wheel zooms at the pointer, drag pans, right-drag
 * sets the window. The decoded volumes stay in their typed arrays; only the slice on screen is copied.
 */
export function SliceViewer(props: Props) {
  const { volumes, layout, slice, tool } = props;
  const box = useRef<HTMLDivElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const [size, setSize] = useState<{ w: number; h: number } | null>(null);
  const [view, setView] = useState<View | null>(null);
  const [drag, setDrag] = useState<Drag | null>(null);
  // Where the pointer rests, in page (client) coordinates: the readout is worked out from it and the
  // box's current place on every render, so it follows the slice when the wheel changes it under a
  // still pointer, and the point under the pointer when the page above the image reflows.
  const [pointer, setPointer] = useState<{ clientX: number; clientY: number } | null>(null);
  const fitted = useRef(1);
  // Per-layout scratch: the slice image and its planes, reused for every slice.
  const scratch = useMemo(() => {
    const n = layout.width * layout.height;
    const image = document.createElement('canvas');
    image.width = layout.width;
    image.height = layout.height;
    return {
      image,
      pixels: new ImageData(layout.width, layout.height),
      scan: new Float32Array(n),
      codes: new Uint8Array(n),
      labels: new Uint16Array(n),
      outlines: [] as LesionOutline[],
      viable: new Uint8Array(n),
      viableRuns: [] as number[],
      viableEdges: [] as number[],
    };
  }, [layout]);
  const widthMm = layout.width * layout.colMm;
  const heightMm = layout.height * layout.rowMm;

  useLayoutEffect(() => {
    const el = box.current;
    if (!el) return;
    const measure = () => setSize({ w: el.clientWidth, h: el.clientHeight });
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  // A new plane or canvas size starts from the whole slice in view; a rebuilt map keeps the zoom.
  useLayoutEffect(() => {
    if (!size || size.w === 0 || size.h === 0) return;
    const v = fitView(widthMm, heightMm, size.w, size.h);
    fitted.current = v.zoom;
    setView(v);
  }, [size, widthMm, heightMm, layout.plane]);

  // The slice image: rebuilt only when the slice, window or wash changes, not on pan or zoom. Built and
  // drawn before the browser paints (layout effects), so a new slice shows in the frame that asked for it.
  const imageVersion = useRef(0);
  useLayoutEffect(() => {
    const { width, height } = layout;
    extractSlice(volumes.scan, volumes.dims, layout, slice, scratch.scan);
    if (volumes.segments) extractSlice(volumes.segments.codes, volumes.dims, layout, slice, scratch.codes);
    composeSlice({
      width, height, scan: scratch.scan, slope: volumes.slope, inter: volumes.inter, window: props.window,
      segments: volumes.segments && props.showSegments ? scratch.codes : null, opacity: props.opacity,
    }, scratch.pixels.data);
    scratch.image.getContext('2d')!.putImageData(scratch.pixels, 0, 0);
    if (volumes.lesions) {
      extractSlice(volumes.lesions.labels, volumes.dims, layout, slice, scratch.labels);
      scratch.outlines = lesionOutlines(scratch.labels, width, height);
    } else scratch.outlines = [];
    if (volumes.viable) {
      extractSlice(volumes.viable, volumes.dims, layout, slice, scratch.viable);
      scratch.viableRuns = maskRuns(scratch.viable, width, height);
      scratch.viableEdges = lesionOutlines(scratch.viable, width, height)[0]?.edges ?? [];
    } else {
      scratch.viableRuns = [];
      scratch.viableEdges = [];
    }
    imageVersion.current++;
    if (box.current) box.current.dataset.image = String(imageVersion.current);
  }, [volumes, layout, slice, props.window, props.showSegments, props.opacity, scratch]);

  const screenOf = useCallback((p: Vec3): { x: number; y: number; slice: number } | null => {
    if (!view) return null;
    const d = displayMmOfWorld(layout, volumes.inverse, p);
    const [x, y] = toScreen(view, d.xMm, d.yMm);
    return { x, y, slice: d.slice };
  }, [view, layout, volumes.inverse]);
  const onThisSlice = (s: number) => Math.abs(s - slice) <= 0.5;

  // Everything drawn over the image, every render: cheap (one drawImage and a few paths).
  useLayoutEffect(() => {
    const c = canvas.current;
    if (!c || !size || !view) return;
    const dpr = window.devicePixelRatio || 1;
    if (c.width !== Math.round(size.w * dpr) || c.height !== Math.round(size.h * dpr)) {
      c.width = Math.round(size.w * dpr);
      c.height = Math.round(size.h * dpr);
    }
    const g = c.getContext('2d')!;
    g.setTransform(dpr, 0, 0, dpr, 0, 0);
    g.fillStyle = '#0d1012';
    g.fillRect(0, 0, size.w, size.h);
    // Voxels stay square-edged: smoothing would blur the segment borders the reader is checking.
    g.imageSmoothingEnabled = false;
    g.drawImage(scratch.image, view.panX, view.panY, widthMm * view.zoom, heightMm * view.zoom);

    const sx = layout.colMm * view.zoom, sy = layout.rowMm * view.zoom;
    const ids = volumes.lesions?.ids ?? [];
    // What the labels read, also kept on the box for checking: "T2 · L1" where the lesion is tracked.
    const shown: string[] = [];
    const named = (id: string) => {
      const track = props.trackOf?.(id.split(' ')[0]);
      const text = track ? `${track} · ${id}` : id;
      shown.push(text);
      return text;
    };
    const label = (text: string, x: number, y: number, bold = false) => {
      g.font = `${bold ? '600 ' : ''}12px system-ui, sans-serif`;
      g.lineWidth = 3;
      g.strokeStyle = 'rgba(0,0,0,0.8)';
      g.strokeText(text, x, y);
      g.fillStyle = '#ffffff';
      g.fillText(text, x, y);
    };
    if (props.showViable && scratch.viableRuns.length > 0) {
      // Viable tumour: white hatching over its voxels and a dashed outline, told from the solid lesion
      // outlines and the segment colours by pattern rather than by colour.
      const runs = scratch.viableRuns;
      g.beginPath();
      for (let k = 0; k < runs.length; k += 3) g.rect(view.panX + runs[k + 1] * sx, view.panY + runs[k] * sy, (runs[k + 2] - runs[k + 1]) * sx, sy);
      g.fillStyle = g.createPattern(hatch(), 'repeat') ?? 'rgba(255,255,255,0.3)';
      g.fill();
      const e = scratch.viableEdges;
      g.beginPath();
      for (let k = 0; k < e.length; k += 4) {
        g.moveTo(view.panX + e[k] * sx, view.panY + e[k + 1] * sy);
        g.lineTo(view.panX + e[k + 2] * sx, view.panY + e[k + 3] * sy);
      }
      g.setLineDash([]);
      g.lineWidth = 3;
      g.strokeStyle = 'rgba(0,0,0,0.7)';
      g.stroke();
      g.setLineDash([4, 3]);
      g.lineWidth = 1.5;
      g.strokeStyle = '#ffffff';
      g.stroke();
      g.setLineDash([]);
    }
    for (const o of scratch.outlines) {
      const id = ids[o.label - 1] ?? `?${o.label}`;
      const chosen = id === props.selected;
      g.beginPath();
      for (let e = 0; e < o.edges.length; e += 4) {
        g.moveTo(view.panX + o.edges[e] * sx, view.panY + o.edges[e + 1] * sy);
        g.lineTo(view.panX + o.edges[e + 2] * sx, view.panY + o.edges[e + 3] * sy);
      }
      g.lineWidth = chosen ? 2.5 : 1.25;
      g.strokeStyle = chosen ? '#ffffff' : 'rgba(255,255,255,0.85)';
      g.stroke();
      label(named(id), view.panX + o.anchor.col * sx, view.panY + o.anchor.row * sy - 4, chosen);
    }

    const line = (p: Vec3, q: Vec3, width: number, dash: number[] = []) => {
      const a = screenOf(p), b = screenOf(q);
      if (!a || !b) return;
      g.setLineDash(dash);
      g.lineWidth = width + 2;
      g.strokeStyle = 'rgba(0,0,0,0.6)';
      g.beginPath(); g.moveTo(a.x, a.y); g.lineTo(b.x, b.y); g.stroke();
      g.lineWidth = width;
      g.strokeStyle = '#ffffff';
      g.beginPath(); g.moveTo(a.x, a.y); g.lineTo(b.x, b.y); g.stroke();
      g.setLineDash([]);
    };
    const drawMark = (m: Mark, chosen: boolean) => {
      const centre = screenOf(m.centreMm);
      if (!centre || !onThisSlice(centre.slice)) return;
      let ends = m.endpointsMm;
      if (drag?.kind === 'mark-end' && drag.id === m.id && ends) {
        const moved = worldOfDisplayMm(layout, volumes.affine, drag.xMm, drag.yMm, drag.slice);
        ends = drag.end === 0 ? [moved, ends[1]] : [ends[0], moved];
      }
      if (ends) {
        line(ends[0], ends[1], chosen ? 2 : 1.5);
        const short = shortAxisEnds({ ...m, endpointsMm: ends });
        if (short) line(short[0], short[1], 1, [4, 3]);
      } else {
        g.beginPath();
        g.arc(centre.x, centre.y, (m.longestAxialMm / 2) * view.zoom, 0, 2 * Math.PI);
        g.lineWidth = 1.5; g.strokeStyle = '#ffffff'; g.stroke();
      }
      const tip = screenOf(ends ? ends[1] : m.centreMm);
      if (tip) label(named(m.id), tip.x + 6, tip.y - 6, chosen);
    };
    for (const m of props.marks) drawMark(m, m.id === props.selected);
    if (drag?.kind === 'stroke' && drag.points.length > 1) {
      g.beginPath();
      drag.points.forEach((p, n) => { const q = screenOf(p); if (q) { if (n === 0) g.moveTo(q.x, q.y); else g.lineTo(q.x, q.y); } });
      g.lineWidth = 2; g.strokeStyle = '#ffd54a'; g.setLineDash([]); g.stroke();
    }
    if (box.current) box.current.dataset.labels = shown.join('|');

    const caliper = drag?.kind === 'caliper' && !drag.short ? { a: drag.from, b: drag.to } : props.draft;
    if (caliper) {
      const a = screenOf(caliper.a);
      if (a && onThisSlice(a.slice)) {
        line(caliper.a, caliper.b, 2);
        const shortMm = drag?.kind === 'caliper' && drag.short && props.draft
          ? shortAxisOfDrag(props.draft.a, props.draft.b, drag.from, drag.to)
          : props.draft?.shortMm ?? null;
        if (shortMm !== null && props.draft) {
          const ends = shortAxisEnds({ id: '', centreMm: mid(props.draft.a, props.draft.b), longestAxialMm: 0, shortAxisMm: shortMm, endpointsMm: [props.draft.a, props.draft.b] });
          if (ends) line(ends[0], ends[1], 1.5, [4, 3]);
        }
        const b = screenOf(caliper.b);
        if (b) label(`${distance(caliper.a, caliper.b).toFixed(1)} mm`, b.x + 8, b.y + 4, true);
      }
    }
  });

  // The slice the wheel last asked for: notches arriving before the screen caught up add to it.
  const wanted = useRef(slice);
  useLayoutEffect(() => {
    wanted.current = slice;
  }, [slice]);
  // Wheel must be a non-passive listener to keep the page from scrolling.
  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const onWheel = (e: WheelEvent) => {
      e.preventDefault();
      if (e.ctrlKey || e.metaKey) {
        const r = el.getBoundingClientRect();
        setView((v) => (v ? zoomAt(v, Math.exp(-e.deltaY * 0.0015), e.clientX - r.left, e.clientY - r.top, fitted.current) : v));
      } else if (e.deltaY !== 0) {
        const step = sliceStepTowardsPlus(layout) * (e.deltaY < 0 ? 1 : -1) * wheelNotches(e);
        const next = Math.min(layout.depth - 1, Math.max(0, wanted.current + step));
        if (next === wanted.current) return;
        wanted.current = next;
        // Render and draw now, inside this event, rather than in a later task after the next paint.
        flushSync(() => props.onSlice(next));
      }
    };
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => el.removeEventListener('wheel', onWheel);
  });

  const local = (e: { clientX: number; clientY: number }) => {
    const r = box.current!.getBoundingClientRect();
    return [e.clientX - r.left, e.clientY - r.top] as const;
  };
  const worldAt = (sx: number, sy: number, s = slice): Vec3 | null => {
    if (!view) return null;
    const [xMm, yMm] = toDisplayMm(view, sx, sy);
    return worldOfDisplayMm(layout, volumes.affine, xMm, yMm, s);
  };
  const lesionAt = (sx: number, sy: number): string | null => {
    if (!view) return null;
    const [xMm, yMm] = toDisplayMm(view, sx, sy);
    const n = voxelIndexOfDisplay(layout, volumes.dims, Math.floor(xMm / layout.colMm), Math.floor(yMm / layout.rowMm), slice);
    if (n < 0) return null;
    const l = volumes.lesions?.labels[n] ?? 0;
    return l > 0 ? volumes.lesions!.ids[l - 1] : null;
  };
  const markAt = (sx: number, sy: number): string | null => {
    for (const m of props.marks) {
      const c = screenOf(m.centreMm);
      if (!c || !onThisSlice(c.slice)) continue;
      const radius = Math.max(8, (m.longestAxialMm / 2) * (view?.zoom ?? 1));
      if (Math.hypot(c.x - sx, c.y - sy) <= radius) return m.id;
    }
    return null;
  };

  const readoutAt = (sx: number, sy: number): Readout | null => {
    if (!view) return null;
    const [xMm, yMm] = toDisplayMm(view, sx, sy);
    const col = Math.floor(xMm / layout.colMm), row = Math.floor(yMm / layout.rowMm);
    const n = voxelIndexOfDisplay(layout, volumes.dims, col, row, slice);
    if (n < 0) return null;
    const code = volumes.segments?.codes[n] ?? 0;
    const l = volumes.lesions?.labels[n] ?? 0;
    return {
      // The voxel's centre: the point whose value and segment are shown.
      world: worldOfDisplayMm(layout, volumes.affine, (col + 0.5) * layout.colMm, (row + 0.5) * layout.rowMm, slice),
      value: volumes.scan[n] * volumes.slope + volumes.inter,
      segment: volumes.segments ? segmentOfCode(code, volumes.segments.splitIV) ?? 'none' : null,
      lesion: l > 0 ? volumes.lesions!.ids[l - 1] : null,
    };
  };
  const readout = pointer && box.current ? readoutAt(...local(pointer)) : null;

  const onPointerDown = (e: ReactPointerEvent<HTMLDivElement>) => {
    if (!view || (e.target as HTMLElement).closest('.handle, .zoom-controls')) return;
    const [x, y] = local(e);
    box.current!.setPointerCapture(e.pointerId);
    box.current!.focus();
    if (e.button === 2 || (e.button === 0 && e.shiftKey)) {
      setDrag({ kind: 'window', x, y, start: props.window });
      return;
    }
    if (e.button !== 0) return;
    if (props.placing) {
      const p = worldAt(x, y);
      if (p) props.onMoveLandmark(props.placing, p);
      return;
    }
    if (props.onStroke) {
      const p = worldAt(x, y);
      if (p) setDrag({ kind: 'stroke', points: [p] });
      return;
    }
    if (props.onPick) {
      const p = worldAt(x, y);
      if (p) props.onPick(p);
      return;
    }
    if (tool === 'mark') {
      if (layout.plane !== 'axial') {
        props.onHint('Lesions are measured on axial slices (RECIST): switch to the axial plane to mark one.');
        return;
      }
      const p = worldAt(x, y);
      if (!p) return;
      props.onHint(null);
      setDrag({ kind: 'caliper', from: p, to: p, short: props.draft !== null && onThisSlice(screenOf(props.draft.a)?.slice ?? -99) });
      return;
    }
    setDrag({ kind: 'pan', x, y, panX: view.panX, panY: view.panY, moved: false });
  };

  const onPointerMove = (e: ReactPointerEvent<HTMLDivElement>) => {
    const [x, y] = local(e);
    setPointer({ clientX: e.clientX, clientY: e.clientY });
    if (!drag || !view) return;
    if (drag.kind === 'pan') {
      const moved = drag.moved || Math.hypot(x - drag.x, y - drag.y) > 3;
      setView({ ...view, panX: drag.panX + x - drag.x, panY: drag.panY + y - drag.y });
      if (moved !== drag.moved) setDrag({ ...drag, moved });
    } else if (drag.kind === 'window') {
      props.onWindow(dragWindow(drag.start, x - drag.x, y - drag.y));
    } else if (drag.kind === 'caliper') {
      const p = worldAt(x, y);
      if (p) setDrag({ ...drag, to: p });
    } else if (drag.kind === 'stroke') {
      // Every pointer event is kept; the gaps between them are filled with dabs when painted.
      const p = worldAt(x, y);
      if (p) setDrag({ kind: 'stroke', points: [...drag.points, p] });
    } else {
      const [xMm, yMm] = toDisplayMm(view, x, y);
      setDrag({ ...drag, xMm, yMm });
    }
  };

  const onPointerUp = (e: ReactPointerEvent<HTMLDivElement>) => {
    const d = drag;
    setDrag(null);
    if (!d) return;
    const [x, y] = local(e);
    if (d.kind === 'pan' && !d.moved && tool !== 'mark') {
      props.onSelect(markAt(x, y) ?? lesionAt(x, y));
    } else if (d.kind === 'caliper') {
      if (!d.short) {
        if (distance(d.from, d.to) < 1) {
          props.onHint('Drag across the lesion along its longest diameter.');
          return;
        }
        props.onDraft({ a: d.from, b: d.to, shortMm: null });
      } else if (props.draft) {
        props.onDraft({ ...props.draft, shortMm: shortAxisOfDrag(props.draft.a, props.draft.b, d.from, d.to) });
      }
    } else if (d.kind === 'stroke') {
      props.onStroke?.(d.points);
    } else if (d.kind === 'landmark') {
      props.onMoveLandmark(d.name, worldOfDisplayMm(layout, volumes.affine, d.xMm, d.yMm, d.slice));
    } else if (d.kind === 'mark-end') {
      props.onMoveMarkEnd(d.id, d.end, worldOfDisplayMm(layout, volumes.affine, d.xMm, d.yMm, d.slice));
    }
  };

  /** A handle starts its own drag; the box gets the pointer so moves and release arrive there. */
  const grab = (e: ReactPointerEvent, start: Drag) => {
    if (e.button !== 0) return;
    e.stopPropagation();
    box.current!.setPointerCapture(e.pointerId);
    setDrag(start);
  };

  const handles: ReactNode[] = [];
  if (view && tool === 'landmarks' && props.landmarks) {
    for (const name of LANDMARK_NAMES) {
      const p = props.landmarks.points[name];
      const d = displayMmOfWorld(layout, volumes.inverse, p);
      if (!onThisSlice(d.slice)) continue;
      const held = drag?.kind === 'landmark' && drag.name === name ? drag : null;
      const [x, y] = toScreen(view, held ? held.xMm : d.xMm, held ? held.yMm : d.yMm);
      const notes = props.landmarkNotes[name] ?? [];
      const proposed = props.proposed?.includes(name) ?? false;
      handles.push(
        <div key={name} className={`landmark-pin${notes.length ? ' has-notes' : ''}${proposed ? ' proposed' : ''}`} style={{ left: x, top: y }} data-proposed={proposed || undefined}>
          <button
            type="button"
            className="handle landmark-handle"
            data-testid="landmark-handle"
            data-landmark={name}
            aria-label={`${LANDMARK_LABELS[name].full}${proposed ? ', proposed' : ''}: drag to move`}
            title={`${LANDMARK_LABELS[name].full}${proposed ? ', proposed from an earlier visit' : ''} (${p.map(fmt).join(', ')} mm)`}
            onPointerDown={(e) => grab(e, { kind: 'landmark', name, xMm: d.xMm, yMm: d.yMm, slice: d.slice })}
          />
          <span className="landmark-tag">{LANDMARK_LABELS[name].short}{proposed ? ' · proposed' : ''}</span>
          {notes.length > 0 && (
            <span className="landmark-note" data-testid="landmark-note-on-image" role="note">{notes.join(' ')}</span>
          )}
        </div>,
      );
    }
  }
  if (view && tool !== 'landmarks' && layout.plane === 'axial') {
    const m = props.marks.find((k) => k.id === props.selected);
    if (m?.endpointsMm && onThisSlice(displayMmOfWorld(layout, volumes.inverse, m.centreMm).slice)) {
      m.endpointsMm.forEach((p, end) => {
        const d = displayMmOfWorld(layout, volumes.inverse, p);
        const held = drag?.kind === 'mark-end' && drag.id === m.id && drag.end === end ? drag : null;
        const [x, y] = toScreen(view, held ? held.xMm : d.xMm, held ? held.yMm : d.yMm);
        handles.push(
          <button
            key={`end-${end}`}
            type="button"
            className="handle mark-handle"
            data-testid="mark-handle"
            aria-label={`${m.id}: caliper end ${end + 1}, drag to move`}
            style={{ left: x, top: y }}
            onPointerDown={(e) => grab(e, { kind: 'mark-end', id: m.id, end: end as 0 | 1, xMm: d.xMm, yMm: d.yMm, slice: d.slice })}
          />,
        );
      });
    }
  }

  const fit = () => {
    if (!size) return;
    const v = fitView(widthMm, heightMm, size.w, size.h);
    fitted.current = v.zoom;
    setView(v);
  };
  const zoomBy = (factor: number) => {
    if (size) setView((v) => (v ? zoomAt(v, factor, size.w / 2, size.h / 2, fitted.current) : v));
  };

  const o = ORIENTATION[layout.plane];
  const centreWorld = worldOfDisplayMm(layout, volumes.affine, widthMm / 2, heightMm / 2, slice);
  const axisName = ['x', 'y', 'z'][layout.plane === 'axial' ? 2 : layout.plane === 'coronal' ? 1 : 0];
  const sliceMm = centreWorld[layout.plane === 'axial' ? 2 : layout.plane === 'coronal' ? 1 : 0];
  return (
    <div className="slice-viewer">
      <div
        ref={box}
        className={`slice-box tool-${props.placing || props.onPick || props.onStroke ? 'place' : tool}${drag?.kind === 'pan' ? ' panning' : ''}`}
        tabIndex={0}
        aria-label={`${PLANE_LABELS[layout.plane]} image, slice ${slice + 1} of ${layout.depth}. Arrow keys or wheel change the slice.`}
        data-testid="slice-viewer"
        data-plane={layout.plane}
        data-slice={slice}
        onPointerDown={onPointerDown}
        onPointerMove={onPointerMove}
        onPointerUp={onPointerUp}
        onPointerCancel={() => setDrag(null)}
        onPointerLeave={() => setPointer(null)}
        onContextMenu={(e) => e.preventDefault()}
        onDoubleClick={(e) => { if (!(e.target as HTMLElement).closest('.zoom-controls')) fit(); }}
      >
        <canvas ref={canvas} className="slice-canvas" data-testid="slice-canvas" style={{ width: size?.w ?? 0, height: size?.h ?? 0 }} />
        {handles}
        <span className="orient orient-left" aria-hidden="true">{o.left}</span>
        <span className="orient orient-right" aria-hidden="true">{o.right}</span>
        <span className="orient orient-top" aria-hidden="true">{o.top}</span>
        <span className="orient orient-bottom" aria-hidden="true">{o.bottom}</span>
        <span className="slice-label" data-testid="slice-label">
          {PLANE_LABELS[layout.plane]} · slice {slice + 1} of {layout.depth} · {axisName} {fmt(sliceMm)} mm
        </span>
        <div className="zoom-controls" role="group" aria-label="Zoom">
          <button type="button" onClick={() => zoomBy(1 / 1.25)} aria-label="Zoom out" data-testid="zoom-out">−</button>
          <button type="button" onClick={() => zoomBy(1.25)} aria-label="Zoom in" data-testid="zoom-in">+</button>
          <button type="button" onClick={fit} data-testid="zoom-fit">Fit</button>
        </div>
        <span className="window-label">W {Math.round(props.window.width)} · L {Math.round(props.window.centre)}</span>
      </div>
      <p className="readout" data-testid="readout" aria-live="off">
        {readout ? (
          <>
            <span>x {fmt(readout.world[0])}  y {fmt(readout.world[1])}  z {fmt(readout.world[2])} mm (RAS)</span>
            <span>value {readout.value === null ? '—' : Math.round(readout.value * 10) / 10}{volumes.values.looksLikeCt ? ' HU' : ''}</span>
            <span data-testid="readout-segment">segment {readout.segment ?? 'no map'}</span>
            {readout.lesion && <span>lesion {readout.lesion}</span>}
          </>
        ) : (
          <span className="muted">Point at the image for position, value and segment.</span>
        )}
      </p>
    </div>
  );
}

/**
 * Slices one wheel event moves. A mouse notch is about 100 px (Chromium, common practice) or 3 lines;
 * events the browser merged carry several notches' delta and move as many slices. Smaller deltas
 * (touchpads) move one slice each, as a notch would.
 */
function wheelNotches(e: WheelEvent): number {
  const notch = e.deltaMode === WheelEvent.DOM_DELTA_LINE ? 3 : e.deltaMode === WheelEvent.DOM_DELTA_PAGE ? 1 : 100;
  return Math.max(1, Math.round(Math.abs(e.deltaY) / notch));
}

function mid(a: Vec3, b: Vec3): Vec3 {
  return [(a[0] + b[0]) / 2, (a[1] + b[1]) / 2, (a[2] + b[2]) / 2];
}
