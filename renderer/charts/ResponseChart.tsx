import { LabelList, ReferenceDot, ReferenceLine, Scatter, ScatterChart } from 'recharts';
import { PD_INCREASE, PD_MIN_INCREASE_MM, PR_DECREASE, round1 } from '../../src/followup/recist';
import { fmtMm, fmtPct, oneDecimal } from '../format';
import { valueScale, type ResponseChartData, type ResponsePoint } from './chart-data';
import { CHART_MARGIN, ChartFrame, courseAxes, INK, MUTED, pointShape, pointTooltip, TipBox, type CourseTime } from './chart-parts';

const SUM_INK = '#0b4f6c';

const ResponseDot = pointShape<ResponsePoint>((p, cx, cy) => (
  <circle
    cx={cx}
    cy={cy}
    r={5}
    fill={p.complete ? SUM_INK : '#fff'}
    stroke={SUM_INK}
    strokeWidth={1.8}
    className="chart-point"
    data-chart="response"
    data-visit={p.visit}
    data-sum={p.sumMm}
    data-category={p.category ?? 'baseline'}
  />
));

/**
 * The sum of target diameters at each visit with its response category, the baseline sum as a line,
 * the nadir ringed, and where the next visit would cross into PR or PD (RECIST 1.1: a 30% decrease
 * from baseline; a 20% and at least 5 mm increase over the nadir).
 */
export function ResponseChart(props: { data: ResponseChartData; time: CourseTime }) {
  const { data } = props;
  const prLine = round1(data.baselineMm * (1 - PR_DECREASE));
  const nadirMm = data.nadir?.sumMm ?? data.baselineMm;
  const pdLine = round1(nadirMm + Math.max(PD_INCREASE * nadirMm, PD_MIN_INCREASE_MM));
  const y = valueScale([...data.points.map((p) => p.sumMm), data.baselineMm, pdLine]);
  const points = data.points.map((p, k) => ({ ...p, tag: k === 0 ? 'baseline' : (p.category ?? '—') }));
  const targets = data.targets.length ? `targets ${data.targets.join(', ')}` : 'no target lesions';
  return (
    <ChartFrame
      id="response"
      title={`Sum of target diameters, ${data.criteria}${data.criteria === 'mRECIST' ? ' (viable tumour)' : ''}`}
      note={<>Response at each visit above its point; {targets}. Dashed: baseline sum ({oneDecimal(data.baselineMm)} mm). Ringed: nadir so far. Dotted: where the next visit would reach PR (−30% from baseline: {oneDecimal(prLine)} mm) or PD (+20% and ≥ 5 mm over the nadir: {oneDecimal(pdLine)} mm). An open point lacks a target that could not be evaluated.</>}
      values={
        <table className="data-table compact fit" data-testid="values-response">
          <thead><tr><th scope="col">Visit</th><th scope="col">Date</th><th scope="col">Sum (mm)</th><th scope="col">vs baseline</th><th scope="col">vs nadir</th><th scope="col">Nadir before (mm)</th><th scope="col">Response</th></tr></thead>
          <tbody>
            {data.points.map((p, k) => (
              <tr key={p.visit} data-testid="response-value" data-visit={p.visit} data-sum={p.sumMm} data-category={p.category ?? 'baseline'}>
                <th scope="row">{p.visit}</th><td>{p.date}</td><td className="num">{oneDecimal(p.sumMm)}{p.complete ? '' : ' (incomplete)'}</td>
                <td className="num">{k === 0 ? 'baseline' : fmtPct(p.changeFromBaselinePct)}</td><td className="num">{k === 0 ? '—' : fmtPct(p.changeFromNadirPct)}</td>
                <td className="num">{oneDecimal(p.nadirSumMm)}</td><td>{k === 0 ? 'baseline' : (p.category ?? '—')}</td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      <ScatterChart responsive style={{ width: '100%', height: 280 }} margin={{ ...CHART_MARGIN, right: CHART_MARGIN.right + 56 }}>
        {courseAxes(props.time, { dataKey: 'sumMm', scale: y, label: 'Sum of diameters (mm)' })}
        {/* Line names sit in the right margin, outside the plot, so they never meet a point's category or the nadir label. */}
        <ReferenceLine y={data.baselineMm} stroke={MUTED} strokeDasharray="6 4" label={{ value: 'baseline', position: 'right', fontSize: 10, fill: MUTED }} />
        {data.points.length > 1 && data.baselineMm > 0 && (
          <ReferenceLine y={prLine} stroke="#9aa3a9" strokeDasharray="1 3" label={{ value: 'PR', position: 'right', fontSize: 10, fill: MUTED }} />
        )}
        {data.points.length > 1 && (
          <ReferenceLine y={pdLine} stroke="#9aa3a9" strokeDasharray="1 3" label={{ value: 'PD', position: 'right', fontSize: 10, fill: MUTED }} />
        )}
        {data.nadir && data.points.length > 1 && (
          <ReferenceDot x={data.nadir.t} y={data.nadir.sumMm} r={10} fill="none" stroke={INK} strokeWidth={1.2} className="nadir-marker" label={{ value: 'nadir', position: 'bottom', offset: 12, fontSize: 10, fill: INK }} />
        )}
        <Scatter name="sum" data={points} dataKey="sumMm" line={{ stroke: SUM_INK, strokeWidth: 2 }} shape={ResponseDot} isAnimationActive={false}>
          <LabelList dataKey="tag" position="top" offset={10} fontSize={11} fontWeight={600} fill={INK} />
        </Scatter>
        {pointTooltip<ResponsePoint>((p) => {
          const first = p.visit === data.points[0]?.visit;
          return (
            <TipBox
              title={`${p.date} (${p.visit})`}
              lines={[
                ['Sum of diameters', `${fmtMm(p.sumMm, 1)}${p.complete ? '' : ' (incomplete)'}`],
                ['vs baseline', first ? 'baseline' : fmtPct(p.changeFromBaselinePct)],
                ['vs nadir', first ? '—' : `${fmtPct(p.changeFromNadirPct)} (nadir ${fmtMm(p.nadirSumMm, 1)})`],
                ['Response', first ? 'baseline' : (p.category ?? '—')],
              ]}
            />
          );
        })}
      </ScatterChart>
    </ChartFrame>
  );
}
