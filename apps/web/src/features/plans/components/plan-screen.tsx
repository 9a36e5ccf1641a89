import { useState } from 'react';
import { Link, useLocation, useNavigate, useParams } from 'react-router-dom';
import type { Plan } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { useCoursePlans } from '../api/get-course-plans';
import { usePlan } from '../api/get-plan';
import { reauthenticateHref, useSigningStatus } from '../api/get-signing-status';
import { useSubmitPlan } from '../api/submit-plan';
import { useSupersedePlan } from '../api/supersede-plan';
import { useUpdatePlan } from '../api/update-plan';

const STATE_LABELS: Record<Plan['state'], string> = {
  draft: 'Draft',
  submitted: 'Submitted – awaiting countersignature',
  returned: 'Returned to the author',
  countersigned: 'Countersigned',
  superseded: 'Superseded by a later version',
};

/** "3 Dec 2026, 08:00" in the hospital's zone. */
export function formatAt(iso: string | null, timeZone: string): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-GB', {
    timeZone,
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).format(new Date(iso));
}

const n = (x: number | null | undefined, unit: string, digits = 1) =>
  x === null || x === undefined ? '—' : `${Number(x.toFixed(digits))} ${unit}`;

/** A 401 that asks for credentials again: offer the way back through the identity provider. */
export function SigningError({ error, returnTo }: { error: unknown; returnTo: string }) {
  if (error instanceof ApiError && error.body.code === 'reauthentication-required') {
    return (
      <p role="alert" className="text-sm text-red-800">
        {error.body.message}.{' '}
        <a className="font-semibold underline" href={reauthenticateHref(undefined, returnTo)}>
          Re-enter your credentials
        </a>
      </p>
    );
  }
  return error ? <ErrorMessage error={error} /> : null;
}

export function SignatureList({ plan }: { plan: Plan }) {
  if (plan.signatures.length === 0)
    return <p className="text-sm text-slate-600">Not signed yet.</p>;
  return (
    <ul className="space-y-2" aria-label="Signatures">
      {plan.signatures.map((s) => (
        <li
          key={s.id}
          data-testid="signature"
          className="rounded border border-slate-200 px-3 py-2 text-sm"
        >
          <p>
            <strong>{s.signerName}</strong> — <em>{s.meaningLabel}</em> —{' '}
            {formatAt(s.signedAt, plan.timeZone)}
          </p>
          {s.comment && <p className="text-slate-700">“{s.comment}”</p>}
          <p
            className={
              s.matchesContent ? 'text-xs text-emerald-800' : 'text-xs font-semibold text-red-800'
            }
            data-testid="signature-link"
          >
            {s.matchesContent ? 'Signature matches content' : 'Content changed after signing'}{' '}
            <span className="font-mono text-slate-500">({s.contentHash.slice(0, 12)}…)</span>
          </p>
        </li>
      ))}
    </ul>
  );
}

export function RegimenSummary({ plan }: { plan: Plan }) {
  const r = plan.regimen;
  return (
    <div className="space-y-2 text-sm">
      <p data-testid="regimen-line" className="text-base font-semibold text-tide-900">
        {r.loadingDoseMg ? `Loading dose ${r.loadingDoseMg} mg, then ` : ''}
        {r.doseMg} mg every {r.intervalH} h
        {r.infusionH > 0 ? ` infused over ${r.infusionH} h (${r.infusionRateMgPerH} mg/h)` : ''}
      </p>
      <p>
        Administration times: <strong>{r.clockTimes.join(', ')}</strong> · first dose{' '}
        {formatAt(r.firstDoseAt, plan.timeZone)}
      </p>
      <table className="w-full text-left text-xs">
        <thead>
          <tr className="text-slate-500">
            <th>Dose</th>
            <th>Amount</th>
            <th>Start</th>
            <th>End</th>
          </tr>
        </thead>
        <tbody>
          {r.doses.map((d) => (
            <tr key={`${d.number}-${d.startAt}`}>
              <td>{d.label}</td>
              <td>{d.doseMg} mg</td>
              <td>{formatAt(d.startAt, plan.timeZone)}</td>
              <td>{formatAt(d.endAt, plan.timeZone)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <div>
        <p className="font-semibold">Next levels</p>
        <ul className="list-disc pl-5" aria-label="Levels to draw">
          {plan.sampling.map((s, i) => (
            <li key={i}>{s.label}</li>
          ))}
        </ul>
      </div>
      <p>
        Re-check: <strong>{formatAt(plan.recheckAt, plan.timeZone)}</strong>
      </p>
      <p data-testid="predicted">
        Predicted: AUC24 {n(plan.predicted?.auc24 ?? null, 'mg·h/L', 0)} · peak{' '}
        {n(plan.predicted?.peakMgL ?? null, 'mg/L')} · trough{' '}
        {n(plan.predicted?.troughMgL ?? null, 'mg/L')} · target {plan.target.metric}{' '}
        {plan.target.low ?? '–'}–{plan.target.high ?? '–'}
        {plan.basis &&
          ` · ${plan.basis.method === 'map' ? 'Bayesian fit' : 'population values'}, model ${plan.basis.model.name} v${plan.basis.model.version}`}
      </p>
    </div>
  );
}

function RationaleEditor({ plan }: { plan: Plan }) {
  const update = useUpdatePlan(plan.id);
  const [text, setText] = useState(plan.rationale);
  const fieldError =
    update.error instanceof ApiError ? update.error.body.fieldErrors?.rationale?.[0] : undefined;
  return (
    <form
      onSubmit={(e) => {
        e.preventDefault();
        update.mutate({ version: plan.version, rationale: text });
      }}
      className="space-y-2"
    >
      <label className="block text-sm font-medium" htmlFor="rationale">
        Rationale
      </label>
      <textarea
        id="rationale"
        value={text}
        onChange={(e) => setText(e.target.value)}
        rows={4}
        className="w-full rounded border border-slate-300 p-2 text-sm"
        aria-invalid={fieldError ? true : undefined}
      />
      {fieldError && <p className="text-sm text-red-800">{fieldError}</p>}
      {update.error && !fieldError ? <ErrorMessage error={update.error} /> : null}
      <Button
        type="submit"
        variant="secondary"
        disabled={update.isPending || text === plan.rationale}
      >
        Save rationale
      </Button>
    </form>
  );
}

function History({ plan }: { plan: Plan }) {
  const plans = useCoursePlans(plan.courseId);
  if (plans.isLoading) return <Loading what="versions" />;
  if (plans.error) return <ErrorMessage error={plans.error} />;
  return (
    <ol className="space-y-1 text-sm" aria-label="Plan versions">
      {plans.data?.items.map((p) => (
        <li key={p.id}>
          {p.id === plan.id ? (
            <strong>Version {p.planNumber}</strong>
          ) : (
            <Link className="text-tide-700 underline" to={paths.plan.getHref(p.courseId, p.id)}>
              Version {p.planNumber}
            </Link>
          )}{' '}
          — {STATE_LABELS[p.state]} — {p.authorName}
        </li>
      ))}
    </ol>
  );
}

export function PlanScreen() {
  const { planId = '' } = useParams();
  const location = useLocation();
  const navigate = useNavigate();
  const plan = usePlan(planId);
  const submit = useSubmitPlan(planId);
  const supersede = useSupersedePlan(planId);
  const signing = useSigningStatus();
  if (plan.isLoading) return <Loading what="the plan" />;
  if (plan.error || !plan.data) return <ErrorMessage error={plan.error} what="plan" />;
  const p = plan.data;
  const here = location.pathname;
  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h1 className="text-xl font-semibold text-tide-900">
            Dosing plan, version {p.planNumber}
          </h1>
          <p data-testid="plan-state" className="text-sm text-slate-700">
            {STATE_LABELS[p.state]} · written by {p.authorName}
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          {p.actions.submit && (
            <Button
              onClick={() => submit.mutate({ version: p.version })}
              disabled={submit.isPending}
            >
              Submit for countersignature
            </Button>
          )}
          {(p.actions.countersign || p.actions.return) && (
            <Link
              to={paths.reviewPlan.getHref(p.id)}
              className="rounded bg-tide-700 px-3 py-1.5 text-sm font-medium text-white"
            >
              Review and countersign
            </Link>
          )}
          {p.actions.supersede && (
            <Button
              variant="secondary"
              disabled={supersede.isPending}
              onClick={() =>
                supersede.mutate(
                  { version: p.version },
                  { onSuccess: (next) => navigate(paths.plan.getHref(next.courseId, next.id)) },
                )
              }
            >
              Start a new version
            </Button>
          )}
          <a
            href={`/api/plans/${p.id}/report.pdf`}
            className="rounded border border-tide-600 px-3 py-1.5 text-sm font-medium text-tide-800"
            download
          >
            Download PDF
          </a>
        </div>
      </header>
      {signing.data && !signing.data.fresh && (p.actions.submit || p.actions.countersign) && (
        <p className="text-sm text-amber-900">
          Signing asks for your credentials again.{' '}
          <a className="underline" href={reauthenticateHref(signing.data, here)}>
            Re-enter them now
          </a>
        </p>
      )}
      <SigningError error={submit.error ?? supersede.error} returnTo={here} />
      {p.returnComment && p.state === 'returned' && (
        <p role="note" className="rounded border border-red-200 bg-red-50 px-3 py-2 text-sm">
          Returned with: “{p.returnComment}”
        </p>
      )}
      <Panel title="Regimen">
        <RegimenSummary plan={p} />
        <Warnings warnings={p.warnings} />
        <ResultCaution text={p.caution} />
      </Panel>
      <Panel title="Rationale">
        {p.actions.edit ? (
          <RationaleEditor key={p.version} plan={p} />
        ) : (
          <p className="whitespace-pre-wrap text-sm">{p.rationale || 'No rationale recorded.'}</p>
        )}
      </Panel>
      <Panel title="Signatures">
        <SignatureList plan={p} />
        <p className="mt-2 font-mono text-xs text-slate-500">Content hash {p.contentHash}</p>
      </Panel>
      <Panel title="Versions">
        <History plan={p} />
      </Panel>
    </div>
  );
}
