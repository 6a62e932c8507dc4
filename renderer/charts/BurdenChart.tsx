import { CartesianGrid, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import type { ScatterShapeProps } from 'recharts/types/util/ScatterUtils';
import { needsOutline, OUTLINE_INK, segmentColour, segmentDash } from './segment-style';
import type { SegmentName } from '../../src/segments/segment-map';
import { valueScale, type BurdenPoint, type BurdenSeries, type TreatmentMarker } from './chart-data';
import { CHART_MARGIN, ChartFrame, fmtMl, fmtMm, GRID, hovered, lineCasing, TipBox, timeAxisProps, treatmentLines, valueAxisLabel } from './chart-parts';
import { SegmentLegend } from './SegmentLegend';

type Metric = 'sumMm' | 'volumeMl';

const METRIC = {
  sumMm: { id: 'burden-mm', title: 'Sum of lesion diameters per segment', axis: 'Sum of longest axial diameters (mm)', attr: 'data-mm' },
  volumeMl: { id: 'burden-ml', title: 'Tumour volume per segment', axis: 'Tumour volume (mL)', attr: 'data-ml' },
} as const;

function burdenDot(metric: Metric) {
  function BurdenDot(props: ScatterShapeProps) {
    const p = props.payload as BurdenPoint;
    if (props.cx === undefined || props.cy === undefined) return <g />;
    return (
      <circle
        cx={props.cx}
        cy={props.cy}
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
    );
  }
  return BurdenDot;
}

/**
 * One segment's tumour burden over time: the sum of its lesions' diameters, or their volume. Every
 * segment that ever held a lesion has a point at every visit (0 when empty); a volume is missing
 * where a lesion was measured by a manual mark, which has no volume.
 */
export function BurdenChart(props: { metric: Metric; series: BurdenSeries[]; domain: [number, number]; ticks: number[]; treatments: TreatmentMarker[] }) {
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
        : missing ? 'No volume at visits measured by manual marks (a mark gives diameters only).' : 'Sum of lesion volumes in each segment.'}
      legend={<SegmentLegend entries={props.series.map((s) => ({ segment: s.segment }))} />}
      values={
        <table className="data-table compact fit" data-testid={`values-${m.id}`}>
          <thead><tr><th scope="col">Segment</th><th scope="col">Visit</th><th scope="col">Date</th><th scope="col">Lesions</th><th scope="col">{metric === 'sumMm' ? 'Sum (mm)' : 'Volume (mL)'}</th></tr></thead>
          <tbody>
            {props.series.flatMap((s) => s.points.map((p) => (
              <tr key={`${s.segment}-${p.visit}`} data-testid="burden-value" data-segment={p.segment ?? 'outside'} data-visit={p.visit} data-value={p[metric] ?? ''}>
                <th scope="row">{p.segment ?? 'outside'}</th><td>{p.visit}</td><td>{p.date}</td><td className="num">{p.count}</td><td className="num">{p[metric] ?? '—'}</td>
              </tr>
            )))}
          </tbody>
        </table>
      }
    >
      <ScatterChart responsive style={{ width: '100%', height: 250 }} margin={CHART_MARGIN}>
        <CartesianGrid stroke={GRID} />
        <XAxis {...timeAxisProps(props.domain, props.ticks)} />
        <YAxis type="number" dataKey={metric} domain={[0, y.max]} ticks={y.ticks} tick={{ fontSize: 11 }} label={valueAxisLabel(m.axis)} width={62} />
        {treatmentLines(props.treatments)}
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
        <Tooltip
          cursor={false}
          isAnimationActive={false}
          content={(tp) => {
            const p = hovered<BurdenPoint>(tp);
            if (!p) return null;
            return (
              <TipBox
                title={`Segment ${p.segment ?? 'outside'} · ${p.date} (${p.visit})`}
                lines={[['Lesions', String(p.count)], ['Sum of diameters', fmtMm(p.sumMm)], ['Volume', fmtMl(p.volumeMl)]]}
              />
            );
          }}
        />
      </ScatterChart>
    </ChartFrame>
  );
}
