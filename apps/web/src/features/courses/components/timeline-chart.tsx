import {
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { Dose, Level } from '@ebbtide/contracts';
import { formatNumber, formatRelativeHour } from '../../../lib/clinical-format';
import { doseHour, levelHour } from '../utils/course-time';

export interface CurvePoint {
  hour: number;
  concentrationMgL: number;
}

/**
 * Doses and levels on one time axis (hours from the first dose): infusions as shaded spans with
 * their duration, boluses as lines, levels as points, and an optional predicted curve.
 */
export function TimelineChart({
  doses,
  levels,
  reference,
  curve,
  curveLabel = 'Predicted',
  height = 260,
}: {
  doses: Dose[];
  levels: Level[];
  reference: string | null;
  curve?: CurvePoint[] | undefined;
  curveLabel?: string;
  height?: number;
}) {
  const levelPoints = levels.map((l) => ({
    hour: levelHour(l, reference),
    level: l.valueMgL,
    kind: l.sampleKind,
  }));
  const doseSpans = doses.map((d) => ({ d, start: doseHour(d, reference) }));
  const hours = [
    ...doseSpans.map((s) => s.start + (s.d.durationH ?? 0)),
    ...levelPoints.map((p) => p.hour),
    ...(curve ?? []).map((p) => p.hour),
    0,
  ];
  const maxHour = Math.max(...hours, 12);
  const minHour = Math.min(...hours, 0);
  const maxConc = Math.max(
    ...levelPoints.map((p) => p.level),
    ...(curve ?? []).map((p) => p.concentrationMgL),
    10,
  );
  const tick = (h: number) => (reference ? `${formatNumber(h, 1)} h` : formatRelativeHour(h));
  return (
    <figure aria-label="Timeline of doses and levels">
      <ResponsiveContainer width="100%" height={height}>
        <ComposedChart
          data={[{ hour: Math.floor(minHour) }, { hour: Math.ceil(maxHour + 2) }]}
          margin={{ top: 10, right: 16, bottom: 4, left: 0 }}
        >
          <CartesianGrid stroke="#e2e8f0" strokeDasharray="3 3" />
          <XAxis
            type="number"
            dataKey="hour"
            domain={[Math.floor(minHour), Math.ceil(maxHour + 2)]}
            tickFormatter={tick}
            fontSize={11}
            allowDuplicatedCategory={false}
          />
          <YAxis
            type="number"
            domain={[0, Math.ceil(maxConc * 1.15)]}
            fontSize={11}
            label={{ value: 'mg/L', angle: -90, position: 'insideLeft', fontSize: 11 }}
          />
          <Tooltip
            formatter={(v) => `${formatNumber(Number(v), 1)} mg/L`}
            labelFormatter={(h) =>
              reference
                ? `${formatNumber(Number(h), 2)} h after first dose`
                : formatRelativeHour(Number(h))
            }
          />
          <Legend wrapperStyle={{ fontSize: 11 }} />
          {doseSpans.map(({ d, start }) =>
            d.durationH ? (
              <ReferenceArea
                key={d.id}
                x1={start}
                x2={start + d.durationH}
                fill="#1f6f7a"
                fillOpacity={d.administrationStatus === 'missed' ? 0.05 : 0.18}
                stroke="#1f6f7a"
                strokeOpacity={0.4}
                ifOverflow="extendDomain"
              />
            ) : (
              <ReferenceLine key={d.id} x={start} stroke="#1f6f7a" strokeDasharray="2 2" />
            ),
          )}
          {curve && (
            <Line
              data={curve}
              dataKey="concentrationMgL"
              name={curveLabel}
              type="monotone"
              dot={false}
              stroke="#185a63"
              strokeWidth={1.5}
              isAnimationActive={false}
            />
          )}
          <Scatter
            data={levelPoints}
            dataKey="level"
            name="Measured level"
            fill="#b45309"
            isAnimationActive={false}
          />
        </ComposedChart>
      </ResponsiveContainer>
      <figcaption className="text-xs text-slate-500">
        Shaded spans: infusions (start to end); dashed lines: boluses; orange points: measured
        levels.
        {reference ? ' Hours from the first recorded dose.' : ' Times relative to the first dose.'}
      </figcaption>
    </figure>
  );
}
