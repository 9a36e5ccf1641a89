import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import type { CaseloadItem, DueItem } from '@ebbtide/contracts';
import { Field, inputClass } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { formatClinicalTime } from '../../../lib/clinical-format';
import { useCaseload, type CaseloadFilters } from '../api/get-caseload';

/** Plain labels of what is due; kinds the server adds later show their own message. */
export const DUE_LABELS: Record<string, string> = {
  'first-level-due': 'First level to draw',
  'level-due': 'Level to draw',
  'level-overdue': 'Level overdue',
  'level-needs-review': 'Level to review',
  'renal-function-unstable': 'Renal function changing',
  'no-recent-weight': 'Weight out of date',
  'plan-awaiting-countersignature': 'Plan awaiting countersignature',
  'plan-recheck-overdue': 'Plan past its re-check time',
};

const urgent = new Set(['level-overdue', 'renal-function-unstable', 'plan-recheck-overdue']);

function DueBadge({ item }: { item: DueItem }) {
  const tone = urgent.has(item.kind)
    ? 'border-red-300 bg-red-50 text-red-800'
    : 'border-tide-100 bg-tide-50 text-tide-900';
  return (
    <li className={`rounded border px-1.5 py-0.5 text-xs ${tone}`} title={item.message}>
      <span className="font-semibold">{DUE_LABELS[item.kind] ?? item.kind}</span>
      {item.dueAt && <span> · {formatClinicalTime({ at: item.dueAt, hour: null })}</span>}
      <span className="sr-only">: {item.message}</span>
    </li>
  );
}

/** The demo hospital's wards; any other ward on the caseload is added. */
const KNOWN_WARDS = ['4 North', 'ICU', 'Renal unit', 'Paediatrics'];

const DRUGS = ['vancomycin', 'gentamicin', 'tobramycin', 'amikacin', 'phenytoin'] as const;

export function CaseloadScreen() {
  const [scope, setScope] = useState<'mine' | 'all'>('mine');
  const [ward, setWard] = useState('');
  const [drug, setDrug] = useState('');
  const [due, setDue] = useState('');
  const [sort, setSort] = useState<NonNullable<CaseloadFilters['sort']>>('due');
  const [order, setOrder] = useState<'asc' | 'desc'>('asc');
  const caseload = useCaseload({ scope, sort, order, ...(ward ? { ward } : {}) });

  const items = useMemo(
    () =>
      (caseload.data?.items ?? []).filter(
        (i) => (!drug || i.drug === drug) && (!due || i.due.some((d) => d.kind === due)),
      ),
    [caseload.data, drug, due],
  );
  const wards = useMemo(
    () =>
      Array.from(
        new Set([
          ...KNOWN_WARDS,
          ...((caseload.data?.items ?? []).map((i) => i.patient.ward).filter(Boolean) as string[]),
          ...(ward ? [ward] : []),
        ]),
      ),
    [caseload.data, ward],
  );

  const sortHeader = (key: typeof sort, label: string) => (
    <th
      scope="col"
      aria-sort={sort === key ? (order === 'asc' ? 'ascending' : 'descending') : 'none'}
    >
      <button
        type="button"
        className="font-semibold hover:underline focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600"
        onClick={() => {
          if (sort === key) setOrder(order === 'asc' ? 'desc' : 'asc');
          else {
            setSort(key);
            setOrder('asc');
          }
        }}
      >
        {label}
        {sort === key ? (order === 'asc' ? ' ▲' : ' ▼') : ''}
      </button>
    </th>
  );

  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="text-xl font-semibold text-tide-900">Caseload</h1>
        <Link to={paths.patients.getHref()} className="text-sm text-tide-700 underline">
          Find or add a patient
        </Link>
      </div>
      <Panel title="Active courses and what is due">
        <form
          aria-label="Caseload filters"
          className="mb-3 flex flex-wrap items-end gap-3"
          onSubmit={(e) => e.preventDefault()}
        >
          <Field label="Whose courses">
            {(a) => (
              <select
                {...a}
                className={inputClass}
                value={scope}
                onChange={(e) => setScope(e.target.value as 'mine' | 'all')}
              >
                <option value="mine">Mine</option>
                <option value="all">Everyone&apos;s I may see</option>
              </select>
            )}
          </Field>
          <Field label="Ward">
            {(a) => (
              <select
                {...a}
                className={inputClass}
                value={ward}
                onChange={(e) => setWard(e.target.value)}
              >
                <option value="">All wards</option>
                {wards.map((w) => (
                  <option key={w}>{w}</option>
                ))}
              </select>
            )}
          </Field>
          <Field label="Drug">
            {(a) => (
              <select
                {...a}
                className={inputClass}
                value={drug}
                onChange={(e) => setDrug(e.target.value)}
              >
                <option value="">All drugs</option>
                {DRUGS.map((d) => (
                  <option key={d}>{d}</option>
                ))}
              </select>
            )}
          </Field>
          <Field label="What is due">
            {(a) => (
              <select
                {...a}
                className={inputClass}
                value={due}
                onChange={(e) => setDue(e.target.value)}
              >
                <option value="">Anything</option>
                {Object.entries(DUE_LABELS).map(([k, label]) => (
                  <option key={k} value={k}>
                    {label}
                  </option>
                ))}
              </select>
            )}
          </Field>
        </form>
        {caseload.isPending && <Loading what="the caseload" />}
        {caseload.isError && <ErrorMessage error={caseload.error} what="load the caseload" />}
        {caseload.data && items.length === 0 && (
          <Empty>
            {caseload.data.items.length === 0
              ? 'No active courses. Open a patient to start a course.'
              : 'No course matches these filters.'}
          </Empty>
        )}
        {items.length > 0 && (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm">
              <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
                <tr>
                  {sortHeader('patient', 'Patient')}
                  {sortHeader('ward', 'Ward')}
                  {sortHeader('drug', 'Drug')}
                  <th scope="col">Last dose</th>
                  <th scope="col">Last level</th>
                  {sortHeader('due', 'Due')}
                  <th scope="col">Next step</th>
                </tr>
              </thead>
              <tbody className="[&_td]:py-1.5 [&_td]:pr-3 [&_td]:align-top">
                {items.map((item) => (
                  <CaseloadRow key={item.courseId} item={item} />
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Panel>
    </div>
  );
}

function CaseloadRow({ item }: { item: CaseloadItem }) {
  return (
    <tr className="border-b border-slate-100">
      <td>
        <Link
          to={paths.course.getHref(item.courseId)}
          className="font-medium text-tide-800 underline"
        >
          {item.patient.displayName}
        </Link>
        <div className="text-xs text-slate-500">
          {item.patient.isTeaching ? 'Teaching case' : `MRN ${item.patient.mrn ?? '—'}`}
        </div>
      </td>
      <td>{item.patient.ward ?? '—'}</td>
      <td className="capitalize">{item.drug}</td>
      <td>
        {item.lastDose ? (
          <>
            {item.lastDose.echo}
            <div className="text-xs text-slate-500">
              {formatClinicalTime({ at: item.lastDose.startAt, hour: item.lastDose.startHour })}
            </div>
          </>
        ) : (
          '—'
        )}
      </td>
      <td>
        {item.lastLevel ? (
          <>
            {item.lastLevel.echo}{' '}
            <span className="text-xs text-slate-500">({item.lastLevel.sampleKind})</span>
            <div className="text-xs text-slate-500">
              {formatClinicalTime({
                at: item.lastLevel.collectedAt,
                hour: item.lastLevel.collectedHour,
              })}
            </div>
          </>
        ) : (
          '—'
        )}
      </td>
      <td>
        {item.due.length === 0 ? (
          <span className="text-xs text-slate-500">Nothing due</span>
        ) : (
          <ul className="flex flex-wrap gap-1">
            {item.due.map((d, i) => (
              <DueBadge key={`${d.kind}-${i}`} item={d} />
            ))}
          </ul>
        )}
      </td>
      <td className="text-xs">{item.nextAction}</td>
    </tr>
  );
}
