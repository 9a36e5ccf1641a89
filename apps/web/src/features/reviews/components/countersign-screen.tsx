import { useState } from 'react';
import { Link, useLocation, useParams } from 'react-router-dom';
import { countersignChecklistLabels, type CountersignChecklist } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { useCountersignPlan } from '../../plans/api/countersign-plan';
import { usePlan } from '../../plans/api/get-plan';
import { usePlanChanges } from '../../plans/api/get-plan-changes';
import { reauthenticateHref, useSigningStatus } from '../../plans/api/get-signing-status';
import { useReturnPlan } from '../../plans/api/return-plan';
import { RegimenSummary, SignatureList, SigningError } from '../../plans/components/plan-screen';

const KEYS = Object.keys(countersignChecklistLabels) as Array<keyof CountersignChecklist>;

function Changes({ planId }: { planId: string }) {
  const changes = usePlanChanges(planId);
  if (changes.isLoading) return <Loading what="the changes" />;
  if (changes.error) return <ErrorMessage error={changes.error} />;
  const data = changes.data!;
  if (!data.comparedWith) {
    return <p className="text-sm">No countersigned plan before this one: everything is new.</p>;
  }
  return (
    <div className="text-sm">
      <p className="mb-2">
        Compared with version {data.comparedWith.planNumber} (countersigned). {data.changes.length}{' '}
        change(s).
      </p>
      <table
        className="w-full text-left text-xs"
        aria-label="Changes since the last countersigned plan"
      >
        <thead>
          <tr className="text-slate-500">
            <th>Area</th>
            <th>What</th>
            <th>Before</th>
            <th>Now</th>
          </tr>
        </thead>
        <tbody>
          {data.changes.map((c, i) => (
            <tr key={i} className="border-t border-slate-100 align-top">
              <td>{c.area}</td>
              <td>{c.field}</td>
              <td className="text-red-800">{c.before ?? '—'}</td>
              <td className="text-emerald-800">{c.after ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** The reviewer's view: changes since the last countersigned plan, the checklist, sign or return. */
export function CountersignScreen() {
  const { planId = '' } = useParams();
  const here = useLocation().pathname;
  const plan = usePlan(planId);
  const signing = useSigningStatus();
  const countersign = useCountersignPlan(planId);
  const giveBack = useReturnPlan(planId);
  const [ticks, setTicks] = useState<Record<string, boolean>>({});
  const [comment, setComment] = useState('');
  if (plan.isLoading) return <Loading what="the plan" />;
  if (plan.error || !plan.data) return <ErrorMessage error={plan.error} what="plan" />;
  const p = plan.data;
  const allTicked = KEYS.every((k) => ticks[k]);
  const commentError =
    giveBack.error instanceof ApiError ? giveBack.error.body.fieldErrors?.comment?.[0] : undefined;
  return (
    <div className="space-y-4">
      <header>
        <h1 className="text-xl font-semibold text-tide-900">
          Review plan version {p.planNumber} by {p.authorName}
        </h1>
        <p className="text-sm">
          <Link className="text-tide-700 underline" to={paths.plan.getHref(p.courseId, p.id)}>
            Open the plan
          </Link>
        </p>
      </header>
      <Panel title="What changed since the last countersigned plan">
        <Changes planId={p.id} />
      </Panel>
      <Panel title="Regimen">
        <RegimenSummary plan={p} />
        <Warnings warnings={p.warnings} />
        <ResultCaution text={p.caution} />
      </Panel>
      <Panel title="Rationale">
        <p className="whitespace-pre-wrap text-sm">{p.rationale || 'No rationale recorded.'}</p>
      </Panel>
      <Panel title="Signatures">
        <SignatureList plan={p} />
      </Panel>
      {p.state === 'submitted' && (p.actions.countersign || p.actions.return) ? (
        <Panel title="Checklist and decision">
          {signing.data && !signing.data.fresh && (
            <p className="mb-2 text-sm text-amber-900">
              Signing asks for your credentials again.{' '}
              <a className="underline" href={reauthenticateHref(signing.data, here)}>
                Re-enter them now
              </a>
            </p>
          )}
          <fieldset className="space-y-1 text-sm">
            <legend className="font-medium">I have checked</legend>
            {KEYS.map((k) => (
              <label key={k} className="flex items-center gap-2">
                <input
                  type="checkbox"
                  checked={!!ticks[k]}
                  onChange={(e) => setTicks({ ...ticks, [k]: e.target.checked })}
                />
                {countersignChecklistLabels[k]}
              </label>
            ))}
          </fieldset>
          <div className="mt-3 flex flex-wrap gap-2">
            <Button
              disabled={!allTicked || countersign.isPending}
              onClick={() =>
                countersign.mutate({
                  version: p.version,
                  contentHash: p.contentHash,
                  checklist: ticks as CountersignChecklist,
                })
              }
            >
              Countersign (reviewed – agree)
            </Button>
          </div>
          <SigningError error={countersign.error} returnTo={here} />
          <form
            className="mt-4 space-y-2"
            onSubmit={(e) => {
              e.preventDefault();
              giveBack.mutate({ version: p.version, comment });
            }}
          >
            <label htmlFor="return-comment" className="block text-sm font-medium">
              Return to the author with a comment (it is e-mailed to them)
            </label>
            <textarea
              id="return-comment"
              rows={3}
              value={comment}
              onChange={(e) => setComment(e.target.value)}
              className="w-full rounded border border-slate-300 p-2 text-sm"
              aria-invalid={commentError ? true : undefined}
            />
            {commentError && <p className="text-sm text-red-800">{commentError}</p>}
            <Button type="submit" variant="danger" disabled={giveBack.isPending}>
              Return with comment
            </Button>
            {!commentError && <SigningError error={giveBack.error} returnTo={here} />}
          </form>
        </Panel>
      ) : (
        <p data-testid="review-outcome" className="text-sm font-semibold">
          This plan is {p.state}.
        </p>
      )}
    </div>
  );
}
