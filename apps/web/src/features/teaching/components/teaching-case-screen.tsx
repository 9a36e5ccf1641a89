import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import {
  pitfallLabels,
  type PitfallCode,
  type PracticePlan,
  type TeachingCase,
} from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { formatNumber } from '../../../lib/clinical-format';
import { usePracticePlans } from '../api/get-practice-plans';
import { useTeachingCase } from '../api/get-teaching-case';
import { useSubmitPracticePlan } from '../api/submit-practice-plan';

const PITFALLS = Object.keys(pitfallLabels) as PitfallCode[];
const v = (x: number | null, decimals = 1) => (x === null ? '—' : formatNumber(x, decimals));

const COVARIATE_LABELS: Record<string, string> = {
  weight: 'Weight',
  height: 'Height',
  'serum-creatinine': 'Serum creatinine',
  albumin: 'Albumin',
  dialysis: 'Dialysis',
};
const ROUTE_LABELS: Record<string, string> = {
  'iv-infusion': 'IV infusion',
  'iv-bolus': 'IV bolus',
  oral: 'oral',
  im: 'IM',
};
type PracticeRoute = 'iv-infusion' | 'iv-bolus' | 'oral' | 'im';
const PRACTICE_ROUTES: PracticeRoute[] = ['iv-infusion', 'iv-bolus', 'oral', 'im'];
const isPracticeRoute = (r: string | undefined): r is PracticeRoute =>
  PRACTICE_ROUTES.includes(r as PracticeRoute);
const TARGET_LABELS: Record<string, string> = {
  auc24: 'AUC24',
  trough: 'trough',
  peak: 'peak',
  'peak-mic-ratio': 'peak/MIC',
  css: 'Css',
};
const TARGET_UNITS: Record<string, string> = {
  auc24: ' mg·h/L',
  trough: ' mg/L',
  peak: ' mg/L',
  'peak-mic-ratio': '',
  css: ' mg/L',
};
const unitLabel = (u: string | null) => (u === 'umol/L' ? 'µmol/L' : (u ?? ''));

const PARAM_ORDER = ['CL', 'V1', 'Q', 'V2', 'ka', 'F', 'Vmax', 'Km'];
const PARAM_UNITS: Record<string, string> = {
  CL: 'L/h',
  V1: 'L',
  Q: 'L/h',
  V2: 'L',
  ka: '1/h',
  F: 'fraction',
  Vmax: 'mg/h',
  Km: 'mg/L',
};
/** Parameters of the estimate and the true patient, in the usual order. */
function paramNames(s: PracticePlan['score']): string[] {
  const rank = (k: string) => (PARAM_ORDER.includes(k) ? PARAM_ORDER.indexOf(k) : 99);
  return [
    ...new Set([...Object.keys(s.estimatedParameters), ...Object.keys(s.trueParameters)]),
  ].sort((a, b) => rank(a) - rank(b));
}

function targetText(t: TeachingCase['target']): string {
  const unit = TARGET_UNITS[t.metric] ?? '';
  const range =
    t.low !== null && t.high !== null
      ? `${t.low}–${t.high}`
      : t.low !== null
        ? `≥ ${t.low}`
        : `≤ ${t.high}`;
  return `${TARGET_LABELS[t.metric] ?? t.metric} ${range}${unit}`;
}

function Score({ plan }: { plan: PracticePlan }) {
  const s = plan.score;
  return (
    <div className="space-y-2 text-sm" data-testid="practice-score">
      <p className="text-lg font-semibold text-tide-900">Score {s.points}/100</p>
      <table className="text-left text-xs" aria-label="Exposure">
        <thead>
          <tr className="text-slate-500">
            <th className="pr-4" />
            <th className="pr-4">AUC24 (mg·h/L)</th>
            <th className="pr-4">Peak (mg/L)</th>
            <th>Trough (mg/L)</th>
          </tr>
        </thead>
        <tbody>
          <tr>
            <td className="pr-4">Your prediction</td>
            <td>{v(s.predicted.auc24, 0)}</td>
            <td>{v(s.predicted.peakMgL)}</td>
            <td>{v(s.predicted.troughMgL)}</td>
          </tr>
          <tr>
            <td className="pr-4">True patient</td>
            <td>{v(s.truth.auc24, 0)}</td>
            <td>{v(s.truth.peakMgL)}</td>
            <td>{v(s.truth.troughMgL)}</td>
          </tr>
        </tbody>
      </table>
      <p>
        {s.targetMet === null
          ? 'No target to check in the true patient'
          : `Target ${s.targetMet ? 'met' : 'not met'} in the true patient`}
        {s.auc24ErrorPercent !== null &&
          ` · AUC24 prediction error ${s.auc24ErrorPercent > 0 ? '+' : ''}${formatNumber(s.auc24ErrorPercent, 0)}%`}
        .
      </p>
      {s.pitfalls.length > 0 || s.falseAlarms.length > 0 ? (
        <ul aria-label="Pitfalls" className="space-y-1">
          {s.pitfalls.map((p) => (
            <li key={p.code}>
              <span
                className={`mr-1 rounded px-1 text-xs font-semibold ${p.caught ? 'bg-emerald-50 text-emerald-800' : 'bg-red-50 text-red-800'}`}
              >
                {p.caught ? 'caught' : 'missed'}
              </span>
              <strong className="font-medium">{p.label}</strong>
              {!p.caught && `: ${p.description}`}
            </li>
          ))}
          {s.falseAlarms.map((code) => (
            <li key={code}>
              <span className="mr-1 rounded bg-slate-100 px-1 text-xs font-semibold text-slate-700">
                not in this case
              </span>
              {pitfallLabels[code]}
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-xs text-slate-600">This case has no deliberate pitfall.</p>
      )}
      <table className="text-left text-xs" aria-label="Parameters">
        <thead>
          <tr className="text-slate-500">
            <th className="pr-4" />
            {paramNames(s).map((k) => (
              <th key={k} className="pr-4">
                {k} ({PARAM_UNITS[k] ?? '—'})
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          <tr>
            <td className="pr-4">Your estimate</td>
            {paramNames(s).map((k) => (
              <td key={k}>{v(s.estimatedParameters[k] ?? null, 2)}</td>
            ))}
          </tr>
          <tr>
            <td className="pr-4">True patient</td>
            {paramNames(s).map((k) => (
              <td key={k}>{v(s.trueParameters[k] ?? null, 2)}</td>
            ))}
          </tr>
        </tbody>
      </table>
      <ul className="list-disc pl-5">
        {s.feedback.map((f, i) => (
          <li key={i}>{f}</li>
        ))}
      </ul>
      <ResultCaution text={plan.caution} />
    </div>
  );
}

/** One teaching case: the record in relative time, a practice plan, and its score. */
export function TeachingCaseScreen() {
  const { caseId = '' } = useParams();
  const tc = useTeachingCase(caseId);
  const attempts = usePracticePlans(caseId);
  const submit = useSubmitPracticePlan(caseId);
  const [dose, setDose] = useState('1000');
  const [interval, setIntervalH] = useState('12');
  const [infusion, setInfusion] = useState('1');
  const [chosenRoute, setRoute] = useState<PracticeRoute | null>(null);
  const [start, setStart] = useState('');
  const [excluded, setExcluded] = useState<string[]>([]);
  const [flags, setFlags] = useState<PitfallCode[]>([]);
  const [rationale, setRationale] = useState('');
  if (tc.isLoading) return <Loading what="the case" />;
  if (tc.error || !tc.data) return <ErrorMessage error={tc.error} what="teaching case" />;
  const c = tc.data;
  const lastDose = Math.max(...c.doses.map((d) => d.time.hour), 0);
  // The route defaults to how the case's last dose was given (an oral phenytoin case stays oral).
  const lastRoute = [...c.doses].sort((a, b) => a.time.hour - b.time.hour).at(-1)?.route;
  const offered = c.model.routes.length > 0 ? c.model.routes : PRACTICE_ROUTES;
  const route: PracticeRoute =
    chosenRoute ??
    (isPracticeRoute(lastRoute) && offered.includes(lastRoute) ? lastRoute : offered[0]!);
  const absorbed = route === 'oral' || route === 'im';
  const errors = submit.error instanceof ApiError ? submit.error.body.fieldErrors : undefined;
  const fe = (k: string) => errors?.[k]?.[0];
  const toggle = <T,>(list: T[], x: T) =>
    list.includes(x) ? list.filter((y) => y !== x) : [...list, x];
  return (
    <div className="space-y-4">
      <header>
        <h1 className="text-xl font-semibold text-tide-900">{c.title}</h1>
        <p className="text-sm text-slate-700">{c.summary}</p>
        <p className="text-xs text-slate-500">
          {c.drug} · {c.sex}, {c.age} years · {c.indication} · target {targetText(c.target)}
          {c.micMgL !== null && ` at MIC ${c.micMgL} mg/L`} · model {c.model.name} v
          {c.model.version}
        </p>
        <p className="mt-1 text-sm">
          Explore it:{' '}
          <Link className="text-tide-700 underline" to={paths.courseFit.getHref(c.courseId)}>
            fit
          </Link>{' '}
          ·{' '}
          <Link className="text-tide-700 underline" to={paths.courseRegimens.getHref(c.courseId)}>
            regimens
          </Link>
        </p>
      </header>
      <Panel title="Record (times from the first dose)">
        <div className="grid gap-4 text-sm md:grid-cols-3">
          <div>
            <p className="font-semibold">Covariates</p>
            <ul>
              {c.covariates.map((cv) => (
                <li key={cv.id}>
                  {cv.time.label}: {COVARIATE_LABELS[cv.kind] ?? cv.kind} {cv.value ?? ''}{' '}
                  {unitLabel(cv.unit)} {cv.detail ? `(${cv.detail})` : ''}
                </li>
              ))}
            </ul>
          </div>
          <div>
            <p className="font-semibold">Doses</p>
            <ul>
              {c.doses.map((d) => (
                <li key={d.id}>
                  {d.time.label}: {d.amountMg} mg {ROUTE_LABELS[d.route] ?? d.route}
                  {d.durationH ? ` over ${d.durationH} h` : ''} ({d.status})
                </li>
              ))}
            </ul>
          </div>
          <div>
            <p className="font-semibold">Levels</p>
            <ul>
              {c.levels.map((l) => (
                <li key={l.id}>
                  <label className="flex items-center gap-2">
                    <input
                      type="checkbox"
                      checked={excluded.includes(l.id)}
                      onChange={() => setExcluded(toggle(excluded, l.id))}
                      aria-label={`Leave out the level at ${l.time.label}`}
                    />
                    {l.time.label}: {l.value} {l.unit} ({l.sampleKind})
                  </label>
                </li>
              ))}
            </ul>
            <p className="text-xs text-slate-500">Tick a level to leave it out of your fit.</p>
          </div>
        </div>
        <ResultCaution text={c.caution} />
      </Panel>
      <Panel title="Practice plan">
        <form
          className="grid gap-2 text-sm sm:grid-cols-4"
          onSubmit={(e) => {
            e.preventDefault();
            submit.mutate({
              regimen: {
                doseMg: Number(dose),
                intervalH: Number(interval),
                infusionH: absorbed || route === 'iv-bolus' ? 0 : Number(infusion),
                route,
                startHour: start === '' ? lastDose + Number(interval) : Number(start),
              },
              excludeLevelIds: excluded,
              pitfallsFlagged: flags,
              rationale,
            });
          }}
        >
          <label className="flex flex-col">
            Dose (mg)
            <input
              value={dose}
              onChange={(e) => setDose(e.target.value)}
              inputMode="decimal"
              className="rounded border p-1"
            />
            {fe('regimen.doseMg') && <span className="text-red-800">{fe('regimen.doseMg')}</span>}
          </label>
          <label className="flex flex-col">
            Every (h)
            <input
              value={interval}
              onChange={(e) => setIntervalH(e.target.value)}
              inputMode="decimal"
              className="rounded border p-1"
            />
            {fe('regimen.intervalH') && (
              <span className="text-red-800">{fe('regimen.intervalH')}</span>
            )}
          </label>
          <label className="flex flex-col">
            Route
            <select
              value={route}
              onChange={(e) => setRoute(e.target.value as PracticeRoute)}
              className="rounded border p-1"
            >
              {offered.map((r) => (
                <option key={r} value={r}>
                  {ROUTE_LABELS[r]}
                </option>
              ))}
            </select>
            {fe('regimen.route') && <span className="text-red-800">{fe('regimen.route')}</span>}
          </label>
          {route === 'iv-infusion' && (
            <label className="flex flex-col">
              Infusion (h)
              <input
                value={infusion}
                onChange={(e) => setInfusion(e.target.value)}
                inputMode="decimal"
                className="rounded border p-1"
              />
              {fe('regimen.infusionH') && (
                <span className="text-red-800">{fe('regimen.infusionH')}</span>
              )}
            </label>
          )}
          <label className="flex flex-col">
            First dose (hour from the case start)
            <input
              value={start}
              placeholder={String(lastDose + Number(interval || 0))}
              onChange={(e) => setStart(e.target.value)}
              inputMode="decimal"
              className="rounded border p-1"
            />
            {fe('regimen.startHour') && (
              <span className="text-red-800">{fe('regimen.startHour')}</span>
            )}
          </label>
          <fieldset className="sm:col-span-4">
            <legend className="font-medium">Pitfalls I found</legend>
            <div className="flex flex-wrap gap-3">
              {PITFALLS.map((p) => (
                <label key={p} className="flex items-center gap-1">
                  <input
                    type="checkbox"
                    checked={flags.includes(p)}
                    onChange={() => setFlags(toggle(flags, p))}
                  />
                  {pitfallLabels[p]}
                </label>
              ))}
            </div>
          </fieldset>
          <label className="flex flex-col sm:col-span-4">
            Rationale
            <textarea
              value={rationale}
              onChange={(e) => setRationale(e.target.value)}
              rows={2}
              className="rounded border p-1"
            />
          </label>
          <div className="sm:col-span-4">
            <Button type="submit" disabled={submit.isPending}>
              Submit practice plan
            </Button>
            <span className="ml-2 text-xs text-slate-500">
              Practice plans are scored here and never go to a reviewer.
            </span>
          </div>
        </form>
        {submit.error && !errors ? <ErrorMessage error={submit.error} /> : null}
        {submit.data && (
          <div className="mt-3">
            <Warnings warnings={submit.data.warnings} />
            <Score plan={submit.data} />
          </div>
        )}
      </Panel>
      <Panel title="Earlier attempts">
        {attempts.data?.items.length ? (
          <ul className="text-sm">
            {attempts.data.items.map((a, i, all) => (
              <li key={a.id}>
                Attempt {all.length - i}: {a.regimen.doseMg} mg every {a.regimen.intervalH} h{' '}
                {a.regimen.route === 'oral'
                  ? 'by mouth'
                  : a.regimen.route === 'im'
                    ? 'IM'
                    : a.regimen.infusionH > 0
                      ? `over ${a.regimen.infusionH} h`
                      : 'as an IV bolus'}{' '}
                — {a.score.points}/100
                {a.score.targetMet !== null && ` · target ${a.score.targetMet ? 'met' : 'not met'}`}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-slate-600">None yet.</p>
        )}
      </Panel>
    </div>
  );
}
