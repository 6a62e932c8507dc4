import type { SegmentName } from '../../src/segments/segment-map';
import { oneDecimal } from '../format';
import { PLANE_APPROXIMATION } from '../../src/segments/build';
import { IMAGE_SEGMENT_COLOURS, legendSegments } from './palette';
import type { VisitVolumes } from './volume-messages';

interface Props {
  volumes: VisitVolumes | null;
  /** Segment volumes from the visit's analysis. */
  segmentVolumes: { segment: SegmentName; volumeMl: number }[] | null;
  liverVolumeMl: number | null;
  show: boolean;
  onShow(show: boolean): void;
  opacity: number;
  onOpacity(opacity: number): void;
}

/** The segment map: where it comes from, its colours with each segment's volume, and the wash controls. */
export function SegmentPanel({ volumes, segmentVolumes, liverVolumeMl, show, onShow, opacity, onOpacity }: Props) {
  const seg = volumes?.segments ?? null;
  const split = seg?.splitIV ?? segmentVolumes?.some((s) => s.segment === 'IVa' || s.segment === 'IVb') ?? false;
  const ml = new Map(segmentVolumes?.map((s) => [s.segment, s.volumeMl]) ?? []);
  return (
    <section className="side-section" aria-labelledby="segment-map-title">
      <h3 id="segment-map-title">Segment map</h3>
      {seg && <p className="side-note" data-testid="map-source">{seg.source === 'built' ? `Built from this visit's landmarks inside the liver mask. ${PLANE_APPROXIMATION}` : 'Imported with the visit.'}</p>}
      {volumes?.overlaysPending && <p className="side-note" data-testid="map-pending">Making the segment map and lesion outlines; the scan is shown meanwhile.</p>}
      {volumes?.segmentProblem && <p className="notice problem" role="alert" data-testid="map-problem">No segment map: {volumes.segmentProblem}</p>}
      <div className="wash-controls">
        <label className="wash-toggle">
          <input type="checkbox" checked={show} onChange={(e) => onShow(e.target.checked)} data-testid="overlay-toggle" /> Show colours <kbd>O</kbd>
        </label>
        <label className="wash-opacity">
          Opacity
          <input type="range" min={0} max={100} step={5} value={Math.round(opacity * 100)} onChange={(e) => onOpacity(Number(e.target.value) / 100)} disabled={!show} data-testid="overlay-opacity" />
          <span className="num">{Math.round(opacity * 100)}%</span>
        </label>
      </div>
      <table className="legend" data-testid="segment-legend">
        <thead><tr><th scope="col">Segment</th><th scope="col" className="num">Volume (mL)</th></tr></thead>
        <tbody>
          {legendSegments(split).map((s) => (
            <tr key={s} data-testid="segment-volume" data-segment={s}>
              <th scope="row"><span className={`swatch${s === 'IVb' ? ' striped' : ''}`} style={{ backgroundColor: IMAGE_SEGMENT_COLOURS[s] }} aria-hidden="true" />{s}</th>
              <td className="num">{oneDecimal(ml.get(s))}</td>
            </tr>
          ))}
          {liverVolumeMl !== null && (
            <tr className="total"><th scope="row">Liver</th><td className="num" data-testid="liver-volume">{liverVolumeMl.toFixed(1)}</td></tr>
          )}
        </tbody>
      </table>
      <p className="side-note">Colours: Okabe–Ito colour-blind-safe palette; IVb striped; I light grey here (its black would vanish on CT).</p>
    </section>
  );
}
