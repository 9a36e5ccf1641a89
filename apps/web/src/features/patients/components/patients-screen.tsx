import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Field, inputClass } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/panel';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { usePatients } from '../api/get-patients';
import { PatientForm } from './patient-form';

export function PatientsScreen() {
  const [q, setQ] = useState('');
  const [kind, setKind] = useState<'' | 'true' | 'false'>('');
  const patients = usePatients({
    ...(q.trim() ? { q: q.trim() } : {}),
    ...(kind ? { isTeaching: kind } : {}),
  });
  return (
    <div className="flex flex-col gap-4">
      <h1 className="text-xl font-semibold text-tide-900">Patients</h1>
      <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
        <Panel title="Find a patient">
          <div className="mb-3 flex flex-wrap items-end gap-3">
            <Field label="Name, MRN or case label" className="min-w-64">
              {(a) => (
                <input
                  {...a}
                  type="search"
                  className={inputClass}
                  value={q}
                  onChange={(e) => setQ(e.target.value)}
                />
              )}
            </Field>
            <Field label="Kind">
              {(a) => (
                <select
                  {...a}
                  className={inputClass}
                  value={kind}
                  onChange={(e) => setKind(e.target.value as '' | 'true' | 'false')}
                >
                  <option value="">All</option>
                  <option value="false">Patients</option>
                  <option value="true">Teaching cases</option>
                </select>
              )}
            </Field>
          </div>
          {patients.isPending && <Loading what="patients" />}
          {patients.isError && <ErrorMessage error={patients.error} what="load patients" />}
          {patients.data?.items.length === 0 && <Empty>No patient matches.</Empty>}
          {patients.data && patients.data.items.length > 0 && (
            <table className="w-full text-left text-sm">
              <thead className="border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3">
                <tr>
                  <th scope="col">Name</th>
                  <th scope="col">MRN</th>
                  <th scope="col">Age · sex</th>
                  <th scope="col">Ward</th>
                </tr>
              </thead>
              <tbody className="[&_td]:py-1.5 [&_td]:pr-3">
                {patients.data.items.map((p) => (
                  <tr key={p.id} className="border-b border-slate-100">
                    <td>
                      <Link
                        to={paths.patient.getHref(p.id)}
                        className="font-medium text-tide-800 underline"
                      >
                        {p.displayName}
                      </Link>
                      {p.isTeaching && (
                        <span className="ml-2 rounded bg-slate-100 px-1 text-xs">teaching</span>
                      )}
                    </td>
                    <td>{p.mrn ?? '—'}</td>
                    <td>
                      {p.ageYears === 90 && p.isTeaching ? '90 or over' : `${p.ageYears} y`} ·{' '}
                      {p.sex}
                    </td>
                    <td>{p.ward ?? '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {patients.data && patients.data.total > patients.data.items.length && (
            <p className="mt-2 text-xs text-slate-500">
              Showing {patients.data.items.length} of {patients.data.total}: narrow the search.
            </p>
          )}
        </Panel>
        <Panel title="Add a patient">
          <PatientForm />
        </Panel>
      </div>
    </div>
  );
}
