import { SegmentMark } from './SegmentMark';
import { LabelList, Scatter, ScatterChart } from 'recharts';
import { needsOutline, OUTLINE_INK, segmentColour, segmentDash } from './segment-style';
import { valueScale, type LesionPoint, type LesionSeries } from './chart-data';
import { CHART_MARGIN, ChartFrame, courseAxes, INK, lineCasing, pointShape, pointTooltip, TipBox, type CourseTime } from './chart-parts';
import { SegmentLegend } from './SegmentLegend';
import { fmtMm, oneDecimal } from '../format';

const STATUS_WORDS: Record<string, string> = { present: 'present', gone: 'gone', merged: 'merged into another lesion', 'not-evaluable': 'outside the scanned field' };

/** A point of a lesion track: larger for a RECIST target. */
const lesionDot = (series: LesionSeries) => pointShape<LesionPoint>((p, cx, cy) => (
  <SegmentMark
    segment={p.segment}
    cx={cx}
    cy={cy}
    r={series.target ? 5 : 3.5}
    fill={segmentColour(p.segment)}
    stroke={needsOutline(p.segment) ? OUTLINE_INK : '#fff'}
    strokeWidth={1.2}
    className="chart-point"
    data-chart="lesion"
    data-track={p.track}
    data-visit={p.visit}
    data-mm={p.mm}
    data-segment={p.segment ?? 'outside'}
  />
));

/** Longest axial diameter of every lesion track over time, coloured by segment. */
export function LesionChart(props: { series: LesionSeries[]; time: CourseTime }) {
  const { series } = props;
  const y = valueScale(series.flatMap((s) => s.points.map((p) => p.mm)));
  const lastOf = (s: LesionSeries) => s.points[s.points.length - 1];
  const width = (s: LesionSeries) => (s.target ? 2.4 : 1.4);
  return (
    <ChartFrame
      id="lesions"
      title="Longest axial diameter per lesion track"
      note="Larger points and heavier lines: RECIST targets. A gone or merged track is drawn at 0 mm."
      legend={<SegmentLegend entries={series.map((s) => ({ segment: s.segment, label: s.track }))} />}
      values={
        <table className="data-table compact fit" data-testid="values-lesions">
          <thead><tr><th scope="col">Track</th><th scope="col">Target</th><th scope="col">Visit</th><th scope="col">Date</th><th scope="col">Segment</th><th scope="col">Longest axial (mm)</th><th scope="col">Status</th></tr></thead>
          <tbody>
            {series.flatMap((s) => s.points.map((p) => (
              <tr key={`${p.track}-${p.visit}`} data-testid="lesion-value" data-track={p.track} data-visit={p.visit} data-mm={p.mm}>
                <th scope="row">{p.track}</th><td>{s.target ? 'yes' : 'no'}</td><td>{p.visit}</td><td>{p.date}</td><td>{p.segment ?? 'outside'}</td><td className="num">{oneDecimal(p.mm)}</td><td>{STATUS_WORDS[p.status] ?? p.status}</td>
              </tr>
            )))}
          </tbody>
        </table>
      }
    >
      <ScatterChart responsive style={{ width: '100%', height: 300 }} margin={CHART_MARGIN}>
        {courseAxes(props.time, { dataKey: 'mm', scale: y, label: 'Longest axial diameter (mm)' })}
        {series.filter((s) => needsOutline(s.segment)).map((s) => lineCasing(s.track, s.points, 'mm', width(s)))}
        {series.map((s) => {
          const colour = segmentColour(s.segment);
          const last = lastOf(s);
          return (
            <Scatter
              key={s.track}
              name={s.track}
              data={s.points.map((p) => ({ ...p, tag: p === last ? s.track : undefined }))}
              dataKey="mm"
              line={{ stroke: colour, strokeWidth: width(s), strokeDasharray: segmentDash(s.segment) }}
              lineJointType="linear"
              shape={lesionDot(s)}
              isAnimationActive={false}
            >
              <LabelList dataKey="tag" position="right" offset={8} fontSize={11} fill={INK} />
            </Scatter>
          );
        })}
        {pointTooltip<LesionPoint>((p) => (
          <TipBox title={`${p.track} · ${p.date} (${p.visit})`} lines={[['Longest axial', fmtMm(p.mm, 1)], ['Segment', p.segment ?? 'outside'], ['Status', STATUS_WORDS[p.status] ?? p.status]]} />
        ))}
      </ScatterChart>
    </ChartFrame>
  );
}
