import { useParams } from 'react-router-dom';
import { Panel } from '../../../components/ui/panel';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { useMe } from '../../auth/api/get-me';
import { CourseForm } from '../../courses/components/course-form';
import { PatientCourses } from '../../courses/components/patient-courses';
import { usePatient } from '../api/get-patient';
import { CovariateForm } from './covariate-form';
import { CovariateHistory } from './covariate-history';
import { DerivedValuesPanel } from './derived-values';

export function PatientScreen() {
  const { patientId = '' } = useParams();
  const patient = usePatient(patientId);
  const me = useMe();
  const canEdit = me.data?.role === 'pharmacist' || me.data?.role === 'reviewer';
  if (patient.isPending) return <Loading what="the patient" />;
  if (patient.isError) return <ErrorMessage error={patient.error} what="load the patient" />;
  const p = patient.data;
  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h1 className="text-xl font-semibold text-tide-900">{p.displayName}</h1>
        <dl className="flex flex-wrap gap-x-4 text-sm text-slate-700 [&_dt]:sr-only">
          {p.isTeaching ? (
            <>
              <dt>Kind</dt>
              <dd className="rounded bg-slate-100 px-1">
                Teaching case · times relative to the first dose
              </dd>
            </>
          ) : (
            <>
              <dt>MRN</dt>
              <dd>MRN {p.mrn}</dd>
              <dt>Born</dt>
              <dd>born {p.birthDate}</dd>
            </>
          )}
          <dt>Age</dt>
          <dd>{p.isTeaching && p.ageYears === 90 ? '90 or over' : `${p.ageYears} y`}</dd>
          <dt>Sex</dt>
          <dd>{p.sex}</dd>
          <dt>Ward</dt>
          <dd>{p.ward ?? 'no ward'}</dd>
        </dl>
      </header>
      <Panel title="Derived values">
        <DerivedValuesPanel patientId={p.id} />
      </Panel>
      <div className="grid gap-4 xl:grid-cols-[2fr_1fr]">
        <Panel title="Covariate history">
          {canEdit && (
            <div className="mb-3 border-b border-slate-100 pb-3">
              <CovariateForm patientId={p.id} isTeaching={p.isTeaching} />
            </div>
          )}
          <CovariateHistory patientId={p.id} canEdit={canEdit} />
        </Panel>
        <div className="flex flex-col gap-4">
          <Panel title="Courses">
            <PatientCourses patientId={p.id} />
          </Panel>
          {canEdit && (
            <Panel title="Start a course">
              <CourseForm patientId={p.id} />
            </Panel>
          )}
        </div>
      </div>
    </div>
  );
}
