import { useMemo, useState } from 'react';
import {
  Area,
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import {
  simulate,
  type Dose as EngineDose,
  type ModelStructure,
  type PkParameters,
} from '@ebbtide/kinetics';
import type { FitResponse, Level } from '@ebbtide/contracts';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { formatClinicalTime, formatNumber, formatRelativeHour } from '../../../lib/clinical-format';
import { useDrugModel } from '../../courses/api/get-drug-model';
import { useCourseContext } from '../../courses/components/course-layout';
import { engineDoses, referenceAt } from '../../courses/utils/course-time';
import { useDoses } from '../../doses/api/get-doses';
import { useLevels } from '../../levels/api/get-levels';
import { structureOf } from '../../regimens/utils/what-if';
import { useFit } from '../api/fit-course';

export const PARAMETER_LABELS: Record<string, string> = {
  CL: 'Clearance CL (L/h)',
  V1: 'Central volume V1 (L)',
  V: 'Volume V (L)',
  Q: 'Intercompartmental clearance Q (L/h)',
  V2: 'Peripheral volume V2 (L)',
  ke: 'Elimination rate ke (1/h)',
  k: 'Elimination rate k (1/h)',
  halfLifeH: 'Half-life (h)',
  Vmax: 'Vmax (mg/h)',
  Km: 'Km (mg/L)',
  ka: 'Absorption rate ka (1/h)',
};

interface CurveRow {
  hour: number;
  fitted?: number;
  population?: number;
  band?: [number, number];
}

/** Fitted and population curves over the recorded doses, with a band from the parameter intervals. */
export function fitCurves(
  model: ModelStructure,
  doses: EngineDose[],
  fit: FitResponse,
  untilHour: number,
): CurveRow[] {
  if (doses.length === 0) return [];
  const times: number[] = [];
  const start = Math.max(0, Math.min(...doses.map((d) => d.time)));
  for (let t = start; t <= untilHour + 1e-9; t += 0.25) times.push(t);
  const run = (p: Record<string, number>) =>
    simulate({
      model,
      parameters: p as unknown as PkParameters,
      doses,
      outputTimes: times,
      options: { estimateError: false },
    }).concentrations;
  const fitted = run(fit.parameters);
  const population = run(fit.populationParameters);
  // Approximate band: the curves at the corners of the CL and V1 intervals (other parameters at their estimate).
  let low: number[] | null = null;
  let high: number[] | null = null;
  const u = fit.uncertainty;
  if (u && (u.CL || u.V1)) {
    const cls = u.CL ? [u.CL.low, u.CL.high] : [fit.parameters.CL as number];
    const vs = u.V1 ? [u.V1.low, u.V1.high] : [fit.parameters.V1 as number];
    for (const CL of cls)
      for (const V1 of vs) {
        const c = run({
          ...fit.parameters,
          ...(CL !== undefined ? { CL } : {}),
          ...(V1 !== undefined ? { V1 } : {}),
        });
        low = low ? low.map((x, i) => Math.min(x, c[i] as number)) : c.slice();
        high = high ? high.map((x, i) => Math.max(x, c[i] as number)) : c.slice();
      }
  }
  return times.map((hour, i) => ({
    hour,
    fitted: fitted[i],
    population: population[i],
    ...(low && high ? { band: [low[i] as number, high[i] as number] as [number, number] } : {}),
  }));
}

function ParametersTable({
  fit,
  compare,
  compareLabel,
}: {
  fit: FitResponse;
  compare?: FitResponse | undefined;
  compareLabel?: string;
}) {
  const order = Object.keys(PARAMETER_LABELS);
  const rank = (n: string) => (order.includes(n) ? order.indexOf(n) : order.length);
  const names = Object.keys(fit.parameters).sort((a, b) => rank(a) - rank(b));
  return (
    <table className="w-full text-left text-sm">
      <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
        <tr>
          <th scope="col">Parameter</th>
          <th scope="col">Estimate</th>
          <th scope="col">90% interval</th>
          <th scope="col">Population</th>
          <th scope="col">Shrinkage</th>
          {compare && <th scope="col">{compareLabel}</th>}
        </tr>
      </thead>
      <tbody className="[&_td]:py-1 [&_td]:pr-3">
        {names.map((n) => {
          const v = fit.parameters[n] as number;
          const u = fit.uncertainty?.[n];
          const s = fit.shrinkage?.[n];
          const c = compare?.parameters[n];
          return (
            <tr key={n} className="border-b border-slate-100">
              <td>{PARAMETER_LABELS[n] ?? n}</td>
              <td className="font-semibold">{formatNumber(v, 3)}</td>
              <td>{u ? `${formatNumber(u.low, 3)} – ${formatNumber(u.high, 3)}` : '—'}</td>
              <td>
                {fit.populationParameters[n] !== undefined
                  ? formatNumber(fit.populationParameters[n] as number, 3)
                  : '—'}
              </td>
              <td>
                {s !== undefined ? (
                  <span title="How far the estimate was pulled back to the population value (0 none, 1 fully)">
                    <meter
                      min={0}
                      max={1}
                      value={s}
                      aria-label={`Shrinkage of ${n}`}
                      className="mr-1 h-2 w-16 align-middle"
                    />
                    {formatNumber(s * 100, 0)}%
                  </span>
                ) : (
                  '—'
                )}
              </td>
              {compare && (
                <td>
                  {c !== undefined ? (
                    <>
                      {formatNumber(c, 3)}{' '}
                      <span className="text-xs text-slate-600">
                        ({c >= v ? '+' : ''}
                        {formatNumber(((c - v) / v) * 100, 0)}%)
                      </span>
                    </>
                  ) : (
                    '—'
                  )}
                </td>
              )}
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

export function FitScreen() {
  const { course, patient } = useCourseContext();
  const doses = useDoses(course.id);
  const levels = useLevels(course.id);
  const model = useDrugModel(course.modelId, course.modelVersion);
  const [excluded, setExcluded] = useState<string[]>([]);
  const hasLevels = (levels.data?.items.length ?? 0) > 0;
  const full = useFit(course.id, { method: 'map' }, hasLevels);
  const loo = useFit(
    course.id,
    { method: 'map', excludeLevelIds: excluded },
    hasLevels && excluded.length > 0,
  );
  const aminoglycoside = ['gentamicin', 'tobramycin', 'amikacin'].includes(course.drug);
  const twoLevel = useFit(
    course.id,
    { method: 'two-level' },
    hasLevels && (levels.data?.items.length ?? 0) >= 2,
  );

  const shown = excluded.length > 0 ? loo.data : full.data;
  const reference = referenceAt(doses.data?.items ?? []);
  const curves = useMemo(() => {
    if (!shown || !doses.data || !levels.data) return [];
    const ed = engineDoses(doses.data.items, reference);
    const last =
      Math.max(
        ...ed.map((d) => d.time + (d.duration ?? 0)),
        ...shown.predictions.map((p) => p.hour),
        0,
      ) + 12;
    try {
      return fitCurves(structureOf(model.data?.definition, shown.parameters), ed, shown, last);
    } catch {
      return [];
    }
  }, [shown, doses.data, levels.data, reference, model.data]);

  if (levels.isPending || doses.isPending) return <Loading what="levels and doses" />;
  if (levels.isError) return <ErrorMessage error={levels.error} what="load levels" />;
  if (!hasLevels)
    return <Empty>Record at least one level to fit the patient&apos;s parameters.</Empty>;

  const levelById = new Map<string, Level>((levels.data?.items ?? []).map((l) => [l.id, l]));
  const observed = (shown?.predictions ?? []).map((p) => ({
    hour: p.hour,
    observed: p.observedMgL,
  }));
  const excludedPoints = (full.data?.predictions ?? [])
    .filter((p) => excluded.includes(p.levelId))
    .map((p) => ({ hour: p.hour, excludedLevel: p.observedMgL }));
  const tick = (h: number) =>
    patient.isTeaching ? formatRelativeHour(h) : `${formatNumber(h, 0)} h`;

  return (
    <div className="flex flex-col gap-4">
      <Panel title="Levels against the fitted and population curves">
        {full.isPending && <Loading what="the Bayesian fit" />}
        {full.isError && <ErrorMessage error={full.error} what="fit" />}
        {loo.isFetching && <Loading what="the refit without the left-out levels" />}
        {loo.isError && <ErrorMessage error={loo.error} what="refit" />}
        {shown && (
          <>
            <p className="mb-1 text-xs text-slate-600">
              Method: Bayesian (MAP) · model {shown.model.id} v{shown.model.version} ·{' '}
              {shown.levelsUsed} level
              {shown.levelsUsed === 1 ? '' : 's'} used
              {excluded.length > 0 && ` · ${excluded.length} left out`}
            </p>
            <figure aria-label="Fit plot">
              <ResponsiveContainer width="100%" height={280}>
                <ComposedChart data={curves} margin={{ top: 10, right: 16, bottom: 4, left: 0 }}>
                  <CartesianGrid stroke="#e2e8f0" strokeDasharray="3 3" />
                  <XAxis
                    type="number"
                    dataKey="hour"
                    domain={['dataMin', 'dataMax']}
                    tickFormatter={tick}
                    fontSize={11}
                  />
                  <YAxis
                    fontSize={11}
                    label={{ value: 'mg/L', angle: -90, position: 'insideLeft', fontSize: 11 }}
                  />
                  <Tooltip
                    formatter={(v) =>
                      (Array.isArray(v)
                        ? v.map((x) => formatNumber(Number(x), 1)).join('–')
                        : formatNumber(Number(v), 1)) + ' mg/L'
                    }
                    labelFormatter={(h) => tick(Number(h))}
                  />
                  <Legend wrapperStyle={{ fontSize: 11 }} />
                  <Area
                    dataKey="band"
                    name="Approx. 90% band"
                    stroke="none"
                    fill="#1f6f7a"
                    fillOpacity={0.15}
                    isAnimationActive={false}
                  />
                  <Line
                    dataKey="population"
                    name="Population model"
                    stroke="#94a3b8"
                    strokeDasharray="5 4"
                    dot={false}
                    isAnimationActive={false}
                  />
                  <Line
                    dataKey="fitted"
                    name="Bayesian fit"
                    stroke="#185a63"
                    strokeWidth={2}
                    dot={false}
                    isAnimationActive={false}
                  />
                  <Scatter
                    data={observed}
                    dataKey="observed"
                    name="Measured (used)"
                    fill="#b45309"
                    isAnimationActive={false}
                  />
                  {excludedPoints.length > 0 && (
                    <Scatter
                      data={excludedPoints}
                      dataKey="excludedLevel"
                      name="Left out"
                      fill="#ffffff"
                      stroke="#b45309"
                      isAnimationActive={false}
                    />
                  )}
                  <ReferenceLine y={0} stroke="#cbd5e1" />
                </ComposedChart>
              </ResponsiveContainer>
              <figcaption className="text-xs text-slate-500">
                The band is approximate: the fitted curve at the ends of the 90% intervals of CL and
                V1.
              </figcaption>
            </figure>
            <Warnings warnings={shown.warnings} label="Fit warnings" />
            <ResultCaution text={shown.caution} />
          </>
        )}
      </Panel>
      <div className="grid gap-4 xl:grid-cols-2">
        <Panel title="Estimates">
          {shown ? (
            <>
              <ParametersTable
                fit={full.data ?? shown}
                compare={excluded.length > 0 ? loo.data : undefined}
                compareLabel="Leaving out"
              />
              <ResultCaution text={shown.caution} />
            </>
          ) : (
            <Loading what="estimates" />
          )}
        </Panel>
        <Panel title="Residuals and leave-one-out">
          {full.data ? (
            <table className="w-full text-left text-sm">
              <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
                <tr>
                  <th scope="col">Level</th>
                  <th scope="col">Measured</th>
                  <th scope="col">Fitted</th>
                  <th scope="col">Population</th>
                  <th scope="col">Residual</th>
                  <th scope="col">Leave out</th>
                </tr>
              </thead>
              <tbody className="[&_td]:py-1 [&_td]:pr-3">
                {full.data.predictions.map((p) => {
                  const l = levelById.get(p.levelId);
                  const when = l
                    ? formatClinicalTime({ at: l.collectedAt, hour: l.collectedHour })
                    : tick(p.hour);
                  return (
                    <tr key={p.levelId} className="border-b border-slate-100">
                      <td className="whitespace-nowrap">{when}</td>
                      <td>{formatNumber(p.observedMgL, 1)} mg/L</td>
                      <td>
                        {p.predictedMgL !== null ? `${formatNumber(p.predictedMgL, 1)} mg/L` : '—'}
                      </td>
                      <td>
                        {p.populationPredictedMgL !== null
                          ? `${formatNumber(p.populationPredictedMgL, 1)} mg/L`
                          : '—'}
                      </td>
                      <td>
                        {p.residualMgL !== null
                          ? `${p.residualMgL > 0 ? '+' : ''}${formatNumber(p.residualMgL, 1)} mg/L`
                          : '—'}
                      </td>
                      <td>
                        <input
                          type="checkbox"
                          aria-label={`Leave out the level at ${when}`}
                          checked={excluded.includes(p.levelId)}
                          disabled={
                            !excluded.includes(p.levelId) &&
                            excluded.length + 1 >= full.data.predictions.length
                          }
                          onChange={(e) =>
                            setExcluded((x) =>
                              e.target.checked
                                ? [...x, p.levelId]
                                : x.filter((id) => id !== p.levelId),
                            )
                          }
                        />
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          ) : (
            <Loading what="residuals" />
          )}
          <p className="mt-2 text-xs text-slate-600">
            Leaving a level out refits on the server without it; the estimates table then shows the
            change.
          </p>
        </Panel>
      </div>
      {(aminoglycoside || (levels.data?.items.length ?? 0) >= 2) && (
        <Panel title="Two-level (log-linear) result beside the Bayesian one">
          {twoLevel.isPending && <Loading what="the two-level result" />}
          {twoLevel.isError && (
            <p className="text-sm text-slate-700">
              The two-level method does not apply here: {twoLevel.error.message}
            </p>
          )}
          {twoLevel.data && full.data && (
            <>
              <table className="w-full text-left text-sm">
                <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
                  <tr>
                    <th scope="col">Parameter</th>
                    <th scope="col">Two-level</th>
                    <th scope="col">Bayesian</th>
                  </tr>
                </thead>
                <tbody className="[&_td]:py-1 [&_td]:pr-3">
                  {Array.from(
                    new Set([
                      ...Object.keys(twoLevel.data.parameters),
                      ...Object.keys(full.data.parameters),
                    ]),
                  ).map((n) => (
                    <tr key={n} className="border-b border-slate-100">
                      <td>{PARAMETER_LABELS[n] ?? n}</td>
                      <td>
                        {twoLevel.data.parameters[n] !== undefined
                          ? formatNumber(twoLevel.data.parameters[n] as number, 3)
                          : '—'}
                      </td>
                      <td>
                        {full.data.parameters[n] !== undefined
                          ? formatNumber(full.data.parameters[n] as number, 3)
                          : '—'}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-1 text-xs text-slate-600">
                The methods agree on average but can differ for one patient; the two-level method
                needs post-distribution levels in one interval and ignores the population prior.
              </p>
              <Warnings warnings={twoLevel.data.warnings} label="Two-level warnings" />
              <ResultCaution text={twoLevel.data.caution} />
            </>
          )}
        </Panel>
      )}
    </div>
  );
}
