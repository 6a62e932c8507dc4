import type { WindowPreset } from '../../src/model/records';
import { PLANE_LABELS, PLANES, type Plane } from './slice';
import type { Tool } from './SliceViewer';
import type { WindowLevel } from './window-level';

interface Props {
  plane: Plane;
  onPlane(p: Plane): void;
  presets: readonly WindowPreset[];
  auto: WindowLevel | null;
  window: WindowLevel | null;
  onWindow(wl: WindowLevel): void;
  tool: Tool;
  onTool(t: Tool): void;
  canMark: boolean;
  canMoveLandmarks: boolean;
}

/** Plane, window and what a drag on the image does. */
export function ViewerToolbar({ plane, onPlane, presets, auto, window, onWindow, tool, onTool, canMark, canMoveLandmarks }: Props) {
  const active = (wl: WindowLevel) => window !== null && window.centre === wl.centre && window.width === wl.width;
  return (
    <div className="viewer-toolbar" role="toolbar" aria-label="Viewer">
      <div className="segmented" role="group" aria-label="Plane">
        {PLANES.map((p) => (
          <button key={p} type="button" aria-pressed={plane === p} onClick={() => onPlane(p)} data-testid={`plane-${p}`}>{PLANE_LABELS[p]}</button>
        ))}
      </div>
      <div className="segmented" role="group" aria-label="Window">
        {presets.map((p) => (
          <button
            key={p.name}
            type="button"
            aria-pressed={active(p)}
            title={`Window ${p.width}, level ${p.centre}`}
            onClick={() => onWindow({ centre: p.centre, width: p.width })}
            data-testid={`window-${p.name.toLowerCase()}`}
          >
            {p.name}
          </button>
        ))}
        {auto && (
          <button type="button" aria-pressed={active(auto)} title="From the 1st to the 99th percentile of this scan's values" onClick={() => onWindow(auto)}>Auto</button>
        )}
      </div>
      <div className="segmented" role="group" aria-label="Tool">
        <button type="button" aria-pressed={tool === 'look'} onClick={() => onTool('look')} data-testid="tool-look">Look</button>
        <button type="button" aria-pressed={tool === 'mark'} onClick={() => onTool('mark')} disabled={!canMark} data-testid="tool-mark">Add lesion</button>
        <button type="button" aria-pressed={tool === 'landmarks'} onClick={() => onTool('landmarks')} disabled={!canMoveLandmarks} data-testid="tool-landmarks">Landmarks</button>
      </div>
    </div>
  );
}
