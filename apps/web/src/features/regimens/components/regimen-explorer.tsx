import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { PkParameters } from '@ebbtide/kinetics';
import type { Plan } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { paths } from '../../../config/paths';
import {
  echoDoseMg,
  echoHours,
  echoRegimen,
  formatAuc,
  formatConcentration,
  formatNumber,
} from '../../../lib/clinical-format';
import { useDrugModel } from '../../courses/api/get-drug-model';
import { useCourseContext } from '../../courses/components/course-layout';
import { describeTarget } from '../../courses/components/patient-courses';
import { doseHour, engineDoses, referenceAt } from '../../courses/utils/course-time';
import { useDoses } from '../../doses/api/get-doses';
import { useFit } from '../../fit/api/fit-course';
import { useLevels } from '../../levels/api/get-levels';
import { useCreatePlan } from '../api/create-plan';
import { useRegimenSearch } from '../api/search-regimens';
import {
  enforceInfusionTime,
  infusionRate,
  practicalFromDefinition,
  snapDose,
} from '../utils/practical';
import { attainment } from '../utils/target';
import { isAbsorbed, routeOfCandidate, type RegimenRoute } from '../utils/route';
import { simulateWhatIf, structureOf, type WhatIfResult } from '../utils/what-if';
import { PtaCell } from './pta-cell';

interface Choice {
  doseMg: number;
  intervalH: number;
  infusionH: number;
  loadingDoseMg: number | null;
  route: RegimenRoute;
}

const choiceOf = (r: {
  doseMg: number;
  intervalH: number;
  infusionH: number;
  loadingDoseMg: number | null;
  regimenKind: Parameters<typeof routeOfCandidate>[0];
}): Choice => ({
  doseMg: r.doseMg,
  intervalH: r.intervalH,
  infusionH: r.infusionH,
  loadingDoseMg: r.loadingDoseMg,
  route: routeOfCandidate(r.regimenKind, r.infusionH),
});

const ATTAIN = {
  yes: { label: 'in range', tone: 'text-emerald-800' },
  below: { label: 'below target', tone: 'text-orange-800' },
  above: { label: 'above target', tone: 'text-red-800' },
  unknown: { label: '—', tone: 'text-slate-500' },
};

const CURVE_COLOURS = ['#185a63', '#b45309', '#6d28d9', '#0f766e'];

export function RegimenExplorer() {
  const { course, canEdit } = useCourseContext();
  const doses = useDoses(course.id);
  const levels = useLevels(course.id);
  const model = useDrugModel(course.modelId, course.modelVersion);
  const hasLevels = (levels.data?.items.length ?? 0) > 0;
  const parameterSource = hasLevels ? 'map' : 'population';
  const fit = useFit(course.id, { method: hasLevels ? 'map' : 'population' }, !levels.isPending);
  const [withLoading, setWithLoading] = useState(false);
  const search = useRegimenSearch(course.id, {
    parameters: parameterSource,
    ...(withLoading ? { loadingDose: true } : {}),
  });
  const createPlan = useCreatePlan(course.id);
  const [plan, setPlan] = useState<Plan | null>(null);
  const [choice, setChoice] = useState<Choice | null>(null);
  const [pinned, setPinned] = useState<number[]>([]);

  const practical = practicalFromDefinition(model.data?.definition);
  const settings = practical.settings;
  const reference = referenceAt(doses.data?.items ?? []);
  const history = useMemo(
    () => engineDoses(doses.data?.items ?? [], reference),
    [doses.data, reference],
  );
  const startHour = useMemo(() => {
    const items = doses.data?.items ?? [];
    if (items.length === 0) return 0;
    const last = Math.max(...items.map((d) => doseHour(d, reference)));
    return last + (choice?.intervalH ?? 12);
  }, [doses.data, reference, choice?.intervalH]);

  const suggestion = search.data?.suggestion ?? search.data?.regimens[0] ?? null;
  const current: Choice | null = choice ?? (suggestion ? choiceOf(suggestion) : null);

  const structure = fit.data ? structureOf(model.data?.definition, fit.data.parameters) : null;
  const simulateChoice = (c: Choice): WhatIfResult | null => {
    if (!fit.data || !structure) return null;
    try {
      const absorbed = isAbsorbed(c.route);
      return simulateWhatIf(structure, fit.data.parameters as unknown as PkParameters, history, {
        ...c,
        absorbed,
        loadingPortionMg: absorbed ? settings.oralLoadingPortionMg : null,
        startHour,
        count: Math.max(4, Math.ceil(96 / c.intervalH)),
      });
    } catch {
      return null;
    }
  };
  const whatIf = current ? simulateChoice(current) : null;

  const set = (patch: Partial<Choice>) => {
    if (!current) return;
    const next = { ...current, ...patch };
    next.doseMg = snapDose(next.doseMg, settings.doseRoundingMg);
    if (next.loadingDoseMg !== null)
      next.loadingDoseMg = snapDose(next.loadingDoseMg, settings.doseRoundingMg);
    const largest = Math.max(next.doseMg, next.loadingDoseMg ?? 0);
    next.infusionH = isAbsorbed(next.route)
      ? 0
      : enforceInfusionTime(next.infusionH, largest, settings.maxInfusionRateMgPerH).infusionH;
    setChoice(next);
  };

  const rateCheck =
    current && !isAbsorbed(current.route)
      ? enforceInfusionTime(
          current.infusionH,
          Math.max(current.doseMg, current.loadingDoseMg ?? 0),
          settings.maxInfusionRateMgPerH,
        )
      : null;

  const pinnedCurves = (search.data?.regimens ?? [])
    .map((r, i) => ({ r, i }))
    .filter(({ i }) => pinned.includes(i))
    .map(({ r, i }) => ({
      i,
      label: `Candidate ${i + 1}`,
      result: simulateChoice(choiceOf(r)),
    }));
  const chartData = (() => {
    const rows = new Map<number, Record<string, number>>();
    const add = (key: string, pts: { hour: number; concentrationMgL: number }[] | undefined) => {
      for (const p of pts ?? []) {
        if (p.hour < startHour - 12) continue;
        const row = rows.get(p.hour) ?? { hour: p.hour };
        row[key] = p.concentrationMgL;
        rows.set(p.hour, row);
      }
    };
    add('whatIf', whatIf?.points);
    for (const c of pinnedCurves) add(`c${c.i}`, c.result?.points);
    return Array.from(rows.values()).sort((a, b) => (a.hour as number) - (b.hour as number));
  })();

  const startDraftPlan = async (c: Choice) => {
    setPlan(null);
    try {
      const created = await createPlan.mutateAsync({
        doseMg: c.doseMg,
        intervalH: c.intervalH,
        infusionH: c.infusionH,
        route: c.route,
        count: 6,
        loadingDoseMg: c.loadingDoseMg,
      });
      setPlan(created);
    } catch {
      // Shown from the mutation's error below.
    }
  };

  if (levels.isPending || doses.isPending) return <Loading what="the course record" />;
  if (doses.data && doses.data.items.length === 0 && !hasLevels)
    return <Empty>Record the doses given (and ideally a level) before exploring regimens.</Empty>;

  return (
    <div className="flex flex-col gap-4">
      <Panel title="Candidate regimens">
        <p className="mb-2 text-xs text-slate-600">
          Target {describeTarget(course.target)} · simulated with the{' '}
          {parameterSource === 'map' ? 'Bayesian estimates' : 'population model (no level yet)'} ·
          doses rounded to {settings.doseRoundingMg} mg
          {settings.maxInfusionRateMgPerH !== null &&
            ` · infusion no faster than ${formatNumber(settings.maxInfusionRateMgPerH)} mg/h`}
          {' · '}ranked by target met, then the drug’s usual intervals and dose sizes, then
          closeness to the target centre
        </p>
        <label className="mb-2 flex items-center gap-2 text-sm">
          <input
            type="checkbox"
            checked={withLoading}
            onChange={(e) => setWithLoading(e.target.checked)}
          />
          propose a loading dose with each regimen
        </label>
        {!practical.found && model.data && (
          <Warnings
            warnings={[
              {
                code: 'no-practical-settings',
                message:
                  'The drug model has no practical settings: no rounding or infusion-rate cap is applied.',
              },
            ]}
          />
        )}
        {search.isPending && <Loading what="candidate regimens" />}
        {search.isError && <ErrorMessage error={search.error} what="find regimens" />}
        {search.data && search.data.regimens.length === 0 && (
          <Empty>No candidate regimen was found for this target.</Empty>
        )}
        {search.data && search.data.regimens.length > 0 && (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm">
              <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
                <tr>
                  <th scope="col">#</th>
                  <th scope="col">Regimen</th>
                  <th scope="col">Loading dose</th>
                  <th scope="col">Peak</th>
                  <th scope="col">Trough</th>
                  <th scope="col">AUC24</th>
                  <th scope="col">Target</th>
                  <th scope="col">PTA</th>
                  <th scope="col">
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              <tbody className="[&_td]:py-1 [&_td]:pr-3 [&_td]:align-top">
                {search.data.regimens.map((r, i) => {
                  const isSuggestion =
                    search.data.suggestion !== null &&
                    r.doseMg === search.data.suggestion.doseMg &&
                    r.intervalH === search.data.suggestion.intervalH;
                  const a = attainment(course.target, r.exposure, course.micMgL);
                  return (
                    <tr
                      key={i}
                      className={`border-b border-slate-100 ${isSuggestion ? 'bg-tide-50' : ''}`}
                    >
                      <td>{i + 1}</td>
                      <td>
                        {echoRegimen(choiceOf(r))}
                        {isSuggestion && (
                          <div className="text-xs font-semibold text-tide-800">
                            {r.usualPractice ? 'suggested' : 'closest to target'}
                          </div>
                        )}
                        {r.practicalityNotes.map((note) => (
                          <div key={note} className="text-xs text-amber-800">
                            {note}
                          </div>
                        ))}
                      </td>
                      <td>
                        {r.loadingDoseMg ? echoDoseMg(r.loadingDoseMg) : '—'}
                        {r.loadingDoseMg && r.loadingPortions && r.loadingPortions > 1 && (
                          <div className="text-xs text-slate-600">
                            in {r.loadingPortions} portions, 2 h apart
                          </div>
                        )}
                      </td>
                      <td>{formatConcentration(r.exposure.peakMgL)}</td>
                      <td>{formatConcentration(r.exposure.troughMgL)}</td>
                      <td>{formatAuc(r.exposure.auc24)}</td>
                      <td className={ATTAIN[a].tone}>
                        {r.meetsTarget ? 'in range' : ATTAIN[a].label}
                      </td>
                      <td>
                        <PtaCell
                          courseId={course.id}
                          regimen={choiceOf(r)}
                          parameters={parameterSource}
                        />
                      </td>
                      <td className="whitespace-nowrap">
                        <Button variant="quiet" onClick={() => setChoice(choiceOf(r))}>
                          Try in what-if
                        </Button>
                        <label className="ml-1 text-xs">
                          <input
                            type="checkbox"
                            className="mr-1"
                            checked={pinned.includes(i)}
                            onChange={(e) =>
                              setPinned((p) =>
                                e.target.checked ? [...p, i].slice(-3) : p.filter((x) => x !== i),
                              )
                            }
                          />
                          plot
                        </label>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
        {search.data && (
          <>
            <Warnings warnings={search.data.warnings} label="Regimen warnings" />
            <ResultCaution text={search.data.caution} />
          </>
        )}
      </Panel>

      <Panel title="What-if (computed in this browser)">
        {fit.isPending && <Loading what="the patient's parameters" />}
        {fit.isError && <ErrorMessage error={fit.error} what="get the patient's parameters" />}
        {!current && !search.isPending && <Empty>Choose a candidate to start from.</Empty>}
        {current && (
          <div className="grid gap-4 lg:grid-cols-[minmax(18rem,1fr)_2fr]">
            <form
              aria-label="What-if regimen"
              className="flex flex-col gap-3"
              onSubmit={(e) => e.preventDefault()}
            >
              <Field
                label="Maintenance dose (mg)"
                hint={`${echoDoseMg(current.doseMg)} · steps of ${settings.doseRoundingMg} mg`}
              >
                {(a) => (
                  <div className="flex items-center gap-2">
                    <input
                      {...a}
                      type="number"
                      className={`${inputClass} w-28`}
                      step={settings.doseRoundingMg}
                      min={settings.doseRoundingMg}
                      value={current.doseMg}
                      onChange={(e) => set({ doseMg: Number(e.target.value) })}
                    />
                    <input
                      type="range"
                      aria-label="Maintenance dose slider"
                      min={settings.doseRoundingMg}
                      max={Math.max(4000, current.doseMg * 2)}
                      step={settings.doseRoundingMg}
                      value={current.doseMg}
                      onChange={(e) => set({ doseMg: Number(e.target.value) })}
                      className="flex-1 accent-tide-700"
                    />
                  </div>
                )}
              </Field>
              <Field label="Interval (h)">
                {(a) => (
                  <select
                    {...a}
                    className={inputClass}
                    value={current.intervalH}
                    onChange={(e) => set({ intervalH: Number(e.target.value) })}
                  >
                    {Array.from(new Set([...settings.usualIntervalsH, current.intervalH]))
                      .sort((x, y) => x - y)
                      .map((h) => (
                        <option key={h} value={h}>
                          every {h} h
                        </option>
                      ))}
                  </select>
                )}
              </Field>
              {!isAbsorbed(current.route) && (
                <Field
                  label="Infusion time (h)"
                  hint={
                    rateCheck && rateCheck.minimumH > 0
                      ? `at least ${echoHours(Math.ceil(rateCheck.minimumH * 4) / 4)} at ${formatNumber(settings.maxInfusionRateMgPerH ?? 0)} mg/h; rate now ${formatNumber(infusionRate(Math.max(current.doseMg, current.loadingDoseMg ?? 0), current.infusionH) ?? 0, 0)} mg/h`
                      : 'quarter-hour steps'
                  }
                >
                  {(a) => (
                    <input
                      {...a}
                      type="number"
                      className={`${inputClass} w-28`}
                      step={0.25}
                      min={rateCheck ? Math.max(0.25, Math.ceil(rateCheck.minimumH * 4) / 4) : 0.25}
                      value={current.infusionH}
                      onChange={(e) => set({ infusionH: Number(e.target.value) })}
                    />
                  )}
                </Field>
              )}
              <fieldset className="flex flex-col gap-1">
                <legend className="text-xs font-semibold text-slate-700">Loading dose</legend>
                <label className="flex items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    checked={current.loadingDoseMg !== null}
                    onChange={(e) =>
                      set({ loadingDoseMg: e.target.checked ? current.doseMg * 1.5 : null })
                    }
                  />
                  give a loading dose first
                </label>
                {current.loadingDoseMg !== null && (
                  <Field label="Loading dose (mg)" hint={echoDoseMg(current.loadingDoseMg)}>
                    {(a) => (
                      <input
                        {...a}
                        type="number"
                        className={`${inputClass} w-28`}
                        step={settings.doseRoundingMg}
                        min={settings.doseRoundingMg}
                        value={current.loadingDoseMg ?? ''}
                        onChange={(e) => set({ loadingDoseMg: Number(e.target.value) })}
                      />
                    )}
                  </Field>
                )}
              </fieldset>
            </form>
            <div>
              <p
                className="text-base font-semibold text-tide-900"
                aria-live="polite"
                data-testid="what-if-echo"
              >
                {echoRegimen(current)}
                {current.loadingDoseMg !== null &&
                  `, after a loading dose of ${echoDoseMg(current.loadingDoseMg)}`}
              </p>
              {whatIf ? (
                <>
                  <dl
                    className="mt-2 grid grid-cols-2 gap-2 sm:grid-cols-4"
                    aria-label="What-if exposure"
                  >
                    <div className="rounded border border-slate-200 p-2">
                      <dt className="text-xs text-slate-600">AUC24 (steady state)</dt>
                      <dd className="text-lg font-semibold" data-testid="what-if-auc24">
                        {formatAuc(whatIf.auc24)}
                      </dd>
                    </div>
                    <div className="rounded border border-slate-200 p-2">
                      <dt className="text-xs text-slate-600">Peak</dt>
                      <dd className="text-lg font-semibold">
                        {formatConcentration(whatIf.peakMgL)}
                      </dd>
                    </div>
                    <div className="rounded border border-slate-200 p-2">
                      <dt className="text-xs text-slate-600">Trough</dt>
                      <dd className="text-lg font-semibold">
                        {formatConcentration(whatIf.troughMgL)}
                      </dd>
                    </div>
                    <div className="rounded border border-slate-200 p-2">
                      <dt className="text-xs text-slate-600">Target</dt>
                      <dd
                        className={`text-lg font-semibold ${ATTAIN[attainment(course.target, whatIf, course.micMgL)].tone}`}
                      >
                        {ATTAIN[attainment(course.target, whatIf, course.micMgL)].label}
                      </dd>
                    </div>
                  </dl>
                  <p className="mt-1 text-xs text-slate-500">
                    AUC over the first 24 h of the regimen {formatAuc(whatIf.auc24FirstDay)} ·
                    computed in {formatNumber(whatIf.elapsedMs, 1)} ms with the{' '}
                    {parameterSource === 'map' ? 'Bayesian estimates' : 'population model'}; the
                    server recomputes anything saved.
                  </p>
                  <figure aria-label="What-if curves" className="mt-2">
                    <ResponsiveContainer width="100%" height={220}>
                      <LineChart
                        data={chartData}
                        margin={{ top: 6, right: 16, bottom: 4, left: 0 }}
                      >
                        <CartesianGrid stroke="#e2e8f0" strokeDasharray="3 3" />
                        <XAxis
                          type="number"
                          dataKey="hour"
                          domain={['dataMin', 'dataMax']}
                          fontSize={11}
                          tickFormatter={(h) => `${formatNumber(Number(h), 0)} h`}
                        />
                        <YAxis
                          fontSize={11}
                          label={{
                            value: 'mg/L',
                            angle: -90,
                            position: 'insideLeft',
                            fontSize: 11,
                          }}
                        />
                        <Tooltip
                          formatter={(v) => `${formatNumber(Number(v), 1)} mg/L`}
                          labelFormatter={(h) => `${formatNumber(Number(h), 1)} h`}
                        />
                        <Legend wrapperStyle={{ fontSize: 11 }} />
                        <Line
                          dataKey="whatIf"
                          name="What-if"
                          stroke={CURVE_COLOURS[0]}
                          strokeWidth={2}
                          dot={false}
                          isAnimationActive={false}
                          connectNulls
                        />
                        {pinnedCurves.map((c, k) => (
                          <Line
                            key={c.i}
                            dataKey={`c${c.i}`}
                            name={c.label}
                            stroke={CURVE_COLOURS[(k + 1) % 4]}
                            strokeDasharray="4 3"
                            dot={false}
                            isAnimationActive={false}
                            connectNulls
                          />
                        ))}
                      </LineChart>
                    </ResponsiveContainer>
                  </figure>
                </>
              ) : (
                fit.data && (
                  <ErrorMessage error={new Error('the engine could not simulate this regimen')} />
                )
              )}
              {fit.data && (
                <Warnings warnings={fit.data.warnings} label="Warnings on the parameters" />
              )}
              <ResultCaution />
              {canEdit && (
                <div className="mt-3 flex flex-wrap items-center gap-2">
                  <Button onClick={() => startDraftPlan(current)} disabled={createPlan.isPending}>
                    Use this regimen
                  </Button>
                  <span className="text-xs text-slate-600">
                    starts a draft plan; the server recomputes it
                  </span>
                </div>
              )}
              {createPlan.isError && (
                <ErrorMessage error={createPlan.error} what="start a draft plan" />
              )}
              {plan && (
                <p
                  role="status"
                  className="mt-2 rounded border border-tide-600 bg-tide-50 px-3 py-2 text-sm text-tide-900"
                >
                  Draft plan {plan.planNumber} started ({plan.state}): {echoRegimen(current)}.{' '}
                  <Link to={paths.plan.getHref(course.id, plan.id)} className="underline">
                    Open the draft plan
                  </Link>
                </p>
              )}
            </div>
          </div>
        )}
      </Panel>
    </div>
  );
}
