import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '../../../components/ui/button';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { useMe } from '../../auth/api/get-me';
import { useCreateAnonymisedCopy } from '../api/create-anonymised-copy';
import { useTeachingCases } from '../api/get-teaching-cases';
import { useTeachingSources } from '../api/get-teaching-sources';

/** Admin only: turn a real course into a teaching case through the anonymising copy. */
function AnonymisingCopy() {
  const sources = useTeachingSources(true);
  const copy = useCreateAnonymisedCopy();
  const [courseId, setCourseId] = useState('');
  const [title, setTitle] = useState('');
  const [indication, setIndication] = useState('');
  const errors = copy.error instanceof ApiError ? copy.error.body.fieldErrors : undefined;
  return (
    <Panel title="Make a teaching case from a real course">
      <p className="mb-2 text-sm text-slate-700">
        The copy keeps no name, record number, date, ward or free-text note; times become hours from
        the first dose and ages over 89 become 90+.
      </p>
      {sources.error ? <ErrorMessage error={sources.error} /> : null}
      <form
        className="grid gap-2 text-sm sm:grid-cols-2"
        onSubmit={(e) => {
          e.preventDefault();
          copy.mutate({ courseId, title, ...(indication ? { indication } : {}) });
        }}
      >
        <label className="flex flex-col">
          Course
          <select
            value={courseId}
            onChange={(e) => setCourseId(e.target.value)}
            className="rounded border p-1"
          >
            <option value="">Choose…</option>
            {sources.data?.items.map((s) => (
              <option key={s.courseId} value={s.courseId}>
                {s.drug}, {s.startedYear ?? 'year not recorded'}, {s.doseCount} doses,{' '}
                {s.levelCount} levels
              </option>
            ))}
          </select>
          {errors?.courseId && <span className="text-red-800">{errors.courseId[0]}</span>}
        </label>
        <label className="flex flex-col">
          Title
          <input
            value={title}
            onChange={(e) => setTitle(e.target.value)}
            className="rounded border p-1"
          />
          {errors?.title && <span className="text-red-800">{errors.title[0]}</span>}
        </label>
        <label className="flex flex-col">
          Indication (replaces the original text)
          <input
            value={indication}
            onChange={(e) => setIndication(e.target.value)}
            className="rounded border p-1"
          />
        </label>
        <div className="flex items-end">
          <Button type="submit" disabled={copy.isPending}>
            Make anonymised copy
          </Button>
        </div>
      </form>
      {copy.error && !errors ? <ErrorMessage error={copy.error} /> : null}
      {copy.data && <p className="mt-2 text-sm text-emerald-800">Created “{copy.data.title}”.</p>}
    </Panel>
  );
}

/** Teaching cases: synthetic or anonymised, in relative time. */
export function TeachingList() {
  const me = useMe();
  const isAdmin = me.data?.role === 'admin';
  const cases = useTeachingCases();
  return (
    <div className="space-y-4">
      <h1 className="text-xl font-semibold text-tide-900">Teaching cases</h1>
      {isAdmin ? (
        <AnonymisingCopy />
      ) : (
        <Panel title="Cases">
          {cases.isLoading && <Loading what="the cases" />}
          {cases.error ? <ErrorMessage error={cases.error} /> : null}
          {cases.data && cases.data.items.length === 0 && <Empty>No teaching case yet.</Empty>}
          <ul className="divide-y divide-slate-100">
            {cases.data?.items.map((c) => (
              <li key={c.id} className="py-2" data-testid="teaching-case">
                <Link
                  className="font-medium text-tide-700 underline"
                  to={paths.teachingCase.getHref(c.id)}
                >
                  {c.title}
                </Link>
                <p className="text-sm text-slate-700">{c.summary}</p>
                <p className="text-xs text-slate-500">
                  {c.drug} · {c.sex}, {c.age} years · {c.doseCount} doses, {c.levelCount} levels ·{' '}
                  {c.origin === 'synthetic' ? 'synthetic' : 'anonymised copy'}
                  {c.attempts > 0 && ` · ${c.attempts} attempt(s), best ${c.bestScore ?? 0}/100`}
                </p>
              </li>
            ))}
          </ul>
        </Panel>
      )}
    </div>
  );
}
