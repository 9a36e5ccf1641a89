import { NavLink, Outlet, useOutletContext, useParams, Link } from 'react-router-dom';
import type { Course, Patient } from '@ebbtide/contracts';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { useMe } from '../../auth/api/get-me';
import { usePatient } from '../../patients/api/get-patient';
import { useCourse } from '../api/get-course';
import { describeTarget } from './patient-courses';

export interface CourseContext {
  course: Course;
  patient: Patient;
  canEdit: boolean;
}

export const useCourseContext = () => useOutletContext<CourseContext>();

const tabClass = ({ isActive }: { isActive: boolean }) =>
  `rounded-t border-b-2 px-3 py-1.5 text-sm focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600 ${
    isActive
      ? 'border-tide-700 font-semibold text-tide-900'
      : 'border-transparent text-slate-600 hover:text-tide-800'
  }`;

/** A course: its header, its sections (record, fit, regimens, import) and the section shown. */
export function CourseLayout() {
  const { courseId = '' } = useParams();
  const course = useCourse(courseId);
  const patient = usePatient(course.data?.patientId ?? '');
  const me = useMe();
  if (course.isPending) return <Loading what="the course" />;
  if (course.isError) return <ErrorMessage error={course.error} what="load the course" />;
  if (patient.isPending) return <Loading what="the patient" />;
  if (patient.isError) return <ErrorMessage error={patient.error} what="load the patient" />;
  const c = course.data;
  const p = patient.data;
  const canEdit = me.data?.role === 'pharmacist' || me.data?.role === 'reviewer';
  return (
    <div className="flex flex-col gap-3">
      <header>
        <p className="text-sm">
          <Link to={paths.patient.getHref(p.id)} className="text-tide-700 underline">
            {p.displayName}
          </Link>
          <span className="text-slate-600">
            {' '}
            · {p.isTeaching ? 'teaching case' : `MRN ${p.mrn}`} · {p.ageYears} y · {p.sex} ·{' '}
            {p.ward ?? 'no ward'}
          </span>
        </p>
        <h1 className="text-xl font-semibold capitalize text-tide-900">
          {c.drug} <span className="normal-case text-slate-600">· {c.indication}</span>
        </h1>
        <p className="text-xs text-slate-600">
          Target {describeTarget(c.target)}
          {c.micMgL !== null &&
            ` · MIC ${c.micMgL} mg/L${c.micMethod ? ` (${c.micMethod})` : ''}`}{' '}
          · model {c.modelId} v{c.modelVersion} · {c.status}
        </p>
      </header>
      <nav aria-label="Course sections" className="flex gap-1 border-b border-slate-200">
        <NavLink end to={paths.course.getHref(c.id)} className={tabClass}>
          Doses and levels
        </NavLink>
        <NavLink to={paths.courseFit.getHref(c.id)} className={tabClass}>
          Fit
        </NavLink>
        <NavLink to={paths.courseRegimens.getHref(c.id)} className={tabClass}>
          Regimen explorer
        </NavLink>
        {canEdit && (
          <NavLink to={paths.courseImport.getHref(c.id)} className={tabClass}>
            Import
          </NavLink>
        )}
      </nav>
      <Outlet context={{ course: c, patient: p, canEdit } satisfies CourseContext} />
    </div>
  );
}
