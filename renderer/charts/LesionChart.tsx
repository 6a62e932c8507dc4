import { SegmentMark } from './SegmentMark';
import { Scatter, ScatterChart, usePlotArea, useXAxisScale, useYAxisScale } from 'recharts';
import { needsOutline, OUTLINE_INK, segmentColour, segmentDash } from './segment-style';
import { valueScale, type LesionPoint, type LesionSeries } from './chart-data';
import type { ReactElement } from 'react';
import { CHART_MARGIN, ChartFrame, courseAxes, INK, lineCasing, MUTED, pointShape, pointTooltip, TipBox, type CourseTime } from './chart-parts';
import { SegmentLegend } from './SegmentLegend';
import { fmtMm, oneDecimal } from '../format';
import { spreadLabels } from './label-spread';

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
  const width = (s: LesionSeries) => (s.target ? 2.4 : 1.4);
  return (
    <ChartFrame
      id="lesions"
      title="Longest axial diameter per lesion track"
      note="Larger points and heavier lines: RECIST targets. A gone or merged track is drawn at 0 mm."
      legend={<SegmentLegend entries={series.map((s) => ({ segment: s.segment, label: s.target ? `${s.track} (target)` : s.track }))} />}
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
        {series.map((s) => (
          <Scatter
            key={s.track}
            name={s.track}
            data={s.points}
            dataKey="mm"
            line={{ stroke: segmentColour(s.segment), strokeWidth: width(s), strokeDasharray: segmentDash(s.segment) }}
            lineJointType="linear"
            shape={lesionDot(s)}
            isAnimationActive={false}
          />
        ))}
        <LineEndLabels series={series} />
        {pointTooltip<LesionPoint>((p) => (
          <TipBox title={`${p.track} · ${p.date} (${p.visit})`} lines={[['Longest axial', fmtMm(p.mm, 1)], ['Segment', p.segment ?? 'outside'], ['Status', STATUS_WORDS[p.status] ?? p.status]]} />
        ))}
      </ScatterChart>
    </ChartFrame>
  );
}

/** Label font size, and the least distance between two labels' centres: the height of the text box the app's font gives at that size, px. */
const LABEL_FONT_PX = 11;
const LABEL_GAP_PX = 14;

/**
 * Each track's id at the end of its line. Lines ending on the same date have their labels nudged
 * apart vertically (label-spread.ts), with a short leader to the point when a label had to move.
 */
function LineEndLabels({ series }: { series: LesionSeries[] }) {
  const x = useXAxisScale();
  const y = useYAxisScale();
  const area = usePlotArea();
  if (!x || !y || !area) return null;
  const ends = series.filter((s) => s.points.length > 0).map((s) => ({ s, p: s.points[s.points.length - 1] }));
  const byDate = new Map<number, typeof ends>();
  for (const e of ends) byDate.set(e.p.t, [...(byDate.get(e.p.t) ?? []), e]);
  const labels: ReactElement[] = [];
  for (const column of byDate.values()) {
    const px = column.map((e) => ({ ...e, cx: x(e.p.t) ?? 0, cy: y(e.p.mm) ?? 0 }));
    const at = spreadLabels(px.map((e) => e.cy), LABEL_GAP_PX, area.y + LABEL_FONT_PX / 2, area.y + area.height - LABEL_FONT_PX / 2);
    px.forEach((e, n) => {
      const tx = e.cx + 10, ty = at[n];
      const moved = Math.abs(ty - e.cy) > 1;
      labels.push(
        <g key={e.s.track} className="line-end-label" data-testid="line-end-label" data-track={e.s.track} data-point-y={e.cy.toFixed(1)} data-label-y={ty.toFixed(1)}>
          {moved && <line x1={e.cx + 5} y1={e.cy} x2={tx - 1} y2={ty} stroke={MUTED} strokeWidth={0.8} />}
          <text x={tx + 1} y={ty} dominantBaseline="central" fontSize={LABEL_FONT_PX} fontWeight={e.s.target ? 700 : 400} fill={INK}>{e.s.track}</text>
        </g>,
      );
    });
  }
  return <g className="line-end-labels">{labels}</g>;
}
