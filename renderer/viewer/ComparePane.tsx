import { useMemo } from 'react';
import type { VisitFollowup } from '../../src/followup/followup';
import { pointInVisit } from '../../src/followup/visit-point';
import type { Vec3 } from '../../src/geometry/mat4';
import type { VisitResult } from '../analysis/types';
import { diameterMarks } from './diameter-marks';
import { displayMmOfWorld, sliceLayout, worldOfDisplayMm, type Plane } from './slice';
import { SliceViewer } from './SliceViewer';
import { useVisitInputs } from './useVisitInputs';
import { useVisitVolumes } from './useVisitVolumes';
import type { WindowLevel } from './window-level';

interface Props {
  patientId: string;
  /** The earlier (or any other) visit shown beside the current one. */
  other: VisitFollowup;
  otherResult: VisitResult | null;
  /** The current visit's alignment to the baseline. */
  current: VisitFollowup;
  plane: Plane;
  /** The world point (current visit's space) at the middle of the current visit's slice. */
  focusMm: Vec3;
  /** Scrolling here moves the current visit to the matching place (a point in the current visit's space). */
  onFocus(p: Vec3): void;
  window: WindowLevel;
  onWindow(wl: WindowLevel): void;
  showSegments: boolean;
  showViable: boolean;
  opacity: number;
  trackOf(lesionId: string): string | undefined;
}

const none = () => {};

/**
 * Another visit beside the current one, read-only, at the same anatomical place: the current slice's
 * middle point is carried into this visit's world through both visits' alignments to the baseline
 * (`pointInVisit`) and the slice holding it is shown. Scrolling here carries the point back, so the
 * two panes scroll together; window and level are shared, and lesions carry their track ids.
 */
export function ComparePane(props: Props) {
  const { patientId, other, current, plane } = props;
  const { state, volumes } = useVisitVolumes(patientId, other.id, 0);
  const inputs = useVisitInputs(patientId, other.id, 0);
  const layout = useMemo(() => (volumes ? sliceLayout(volumes.dims, volumes.affine, volumes.spacingMm, plane) : null), [volumes, plane]);
  const here = pointInVisit(props.focusMm, current.alignment.transform, other.alignment.transform);
  const slice = layout && volumes ? Math.min(layout.depth - 1, Math.max(0, Math.round(displayMmOfWorld(layout, volumes.inverse, here).slice))) : 0;
  const marks = useMemo(
    () => [...(inputs?.marks ?? []), ...diameterMarks(props.otherResult?.analysis.lesions ?? [])],
    [inputs, props.otherResult],
  );
  const a = other.alignment;
  return (
    <div className="compare-pane" data-testid="compare-pane" data-visit={other.id}>
      <p className="pane-title">
        <strong>Visit {other.id}</strong> · {other.date} · {a.method === 'reference' ? 'the baseline' : a.method === 'none' ? 'not aligned (world positions as scanned)' : `aligned by ${a.method === 'liver' ? 'the liver surfaces' : 'the landmarks'}, residual ${a.residualMm?.toFixed(1)} mm`}
      </p>
      {state.status === 'failed' && <p className="notice problem" role="alert">The images of visit {other.id} could not be shown: {state.message}</p>}
      {volumes && layout ? (
        <SliceViewer
          volumes={volumes}
          layout={layout}
          slice={slice}
          onSlice={(s) => {
            // The point under the same place of the asked-for slice, carried back into the current visit.
            const at = displayMmOfWorld(layout, volumes.inverse, here);
            props.onFocus(pointInVisit(worldOfDisplayMm(layout, volumes.affine, at.xMm, at.yMm, s), other.alignment.transform, current.alignment.transform));
          }}
          window={props.window}
          onWindow={props.onWindow}
          showSegments={props.showSegments}
          showViable={props.showViable}
          opacity={props.opacity}
          tool="look"
          marks={marks}
          selected={null}
          onSelect={none}
          draft={null}
          onDraft={none}
          onMoveMarkEnd={none}
          landmarks={null}
          landmarkNotes={{}}
          onMoveLandmark={none}
          placing={null}
          onHint={none}
          trackOf={props.trackOf}
        />
      ) : (
        state.status !== 'failed' && <div className="slice-placeholder" aria-hidden="true" />
      )}
    </div>
  );
}
