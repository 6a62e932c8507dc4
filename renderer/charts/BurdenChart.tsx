import { SegmentMark } from './SegmentMark';
import { Scatter, ScatterChart } from 'recharts';
import { needsOutline, OUTLINE_INK, segmentColour, segmentDash } from './segment-style';
import type { SegmentName } from '../../src/segments/segment-map';
import { valueScale, type BurdenPoint, type BurdenSeries } from './chart-data';
import { CHART_MARGIN, ChartFrame, courseAxes, lineCasing, pointShape, pointTooltip, TipBox, type CourseTime } from './chart-parts';
import { SegmentLegend } from './SegmentLegend';
import { fmtMl, fmtMm, oneDecimal } from '../format';

type Metric = 'sumMm' | 'volumeMl';

const METRIC = {
  sumMm: { id: 'burden-mm', title: 'Sum of lesion diameters per segment', axis: 'Sum of longest axial diameters (mm)', attr: 'data-mm' },
  volumeMl: { id: 'burden-ml', title: 'Tumour volume per segment', axis: 'Tumour volume (mL)', attr: 'data-ml' },
} as const;

const burdenDot = (metric: Metric) => pointShape<BurdenPoint>((p, cx, cy) => (
  <SegmentMark
    segment={p.segment}
    cx={cx}
    cy={cy}
    r={4}
    fill={segmentColour(p.segment)}
    stroke={needsOutline(p.segment) ? OUTLINE_INK : '#fff'}
    strokeWidth={1}
    className="chart-point"
    data-chart={METRIC[metric].id}
    data-segment={p.segment ?? 'outside'}
    data-visit={p.visit}
    {...{ [METRIC[metric].attr]: p[metric] }}
  />
));

/**
 * One segment's tumour burden over time: the sum of its lesions' diameters, or their volume. Every
 * segment that ever held a lesion has a point at every visit (0 when empty); a volume is missing
 * where a lesion was measured by a manual mark, which has no volume.
 */
export function BurdenChart(props: { metric: Metric; series: BurdenSeries[]; time: CourseTime }) {
  const m = METRIC[props.metric];
  const metric = props.metric;
  // A line only joins consecutive visits with a value: a missing volume is a gap, never bridged.
  const runs = props.series.flatMap((s) => {
    const out: { segment: SegmentName | null; key: string; points: BurdenPoint[] }[] = [];
    let current: BurdenPoint[] = [];
    const close = () => { if (current.length) out.push({ segment: s.segment, key: `${s.segment ?? 'outside'}-${out.length}`, points: current }); current = []; };
    for (const p of s.points) {
      if (p[metric] === null) close();
      else current.push(p);
    }
    close();
    return out;
  });
  const missing = props.series.some((s) => s.points.some((p) => p[metric] === null));
  const y = valueScale(runs.flatMap((r) => r.points.map((p) => p[metric])));
  return (
    <ChartFrame
      id={m.id}
      title={m.title}
      note={metric === 'sumMm'
        ? 'Every segment that holds a lesion at any visit, at every visit (0 when it holds none).'
        : `Tumour lying in each segment: each lesion's volume shared by its segment fractions, the figure the Remnant tab uses.${missing ? ' No volume at visits measured by manual marks (a mark gives diameters only).' : ''}`}
      legend={<SegmentLegend entries={props.series.map((s) => ({ segment: s.segment }))} />}
      values={
        <table className="data-table compact fit" data-testid={`values-${m.id}`}>
          <thead><tr><th scope="col">Segment</th><th scope="col">Visit</th><th scope="col">Date</th><th scope="col">Lesions</th><th scope="col">{metric === 'sumMm' ? 'Sum (mm)' : 'Volume (mL)'}</th></tr></thead>
          <tbody>
            {props.series.flatMap((s) => s.points.map((p) => (
              <tr key={`${s.segment}-${p.visit}`} data-testid="burden-value" data-segment={p.segment ?? 'outside'} data-visit={p.visit} data-value={p[metric] ?? ''}>
                <th scope="row">{p.segment ?? 'outside'}</th><td>{p.visit}</td><td>{p.date}</td><td className="num">{p.count}</td><td className="num">{oneDecimal(p[metric])}</td>
              </tr>
            )))}
          </tbody>
        </table>
      }
    >
      <ScatterChart responsive style={{ width: '100%', height: 250 }} margin={CHART_MARGIN}>
        {courseAxes(props.time, { dataKey: metric, scale: y, label: m.axis })}
        {runs.filter((r) => needsOutline(r.segment)).map((r) => lineCasing(r.key, r.points, metric, 2))}
        {runs.map((s) => (
          <Scatter
            key={s.key}
            name={s.segment ?? 'outside'}
            data={s.points}
            dataKey={metric}
            line={{ stroke: segmentColour(s.segment), strokeWidth: 2, strokeDasharray: segmentDash(s.segment) }}
            shape={burdenDot(metric)}
            isAnimationActive={false}
          />
        ))}
        {pointTooltip<BurdenPoint>((p) => (
          <TipBox
            title={`Segment ${p.segment ?? 'outside'} · ${p.date} (${p.visit})`}
            lines={[['Lesions centred here', String(p.count)], ['Sum of diameters', fmtMm(p.sumMm, 1)], ['Tumour volume', fmtMl(p.volumeMl, 1)]]}
          />
        ))}
      </ScatterChart>
    </ChartFrame>
  );
}
