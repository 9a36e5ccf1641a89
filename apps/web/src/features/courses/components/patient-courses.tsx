import { Link } from 'react-router-dom';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { formatAuc, formatConcentration, formatNumber } from '../../../lib/clinical-format';
import type { Target } from '@ebbtide/contracts';
import { usePatientCourses } from '../api/get-patient-courses';

export function describeTarget(t: Target): string {
  const show = (v: number | null) => {
    if (v === null) return '';
    if (t.metric === 'auc24') return formatAuc(v);
    if (t.metric === 'peak-mic-ratio') return formatNumber(v, 1);
    return formatConcentration(v);
  };
  const name = {
    auc24: 'AUC24',
    trough: 'trough',
    peak: 'peak',
    'peak-mic-ratio': 'peak/MIC',
    css: 'Css',
  }[t.metric];
  if (t.low !== null && t.high !== null) {
    // "AUC24 400–600 mg·h/L": the unit once, after the range.
    const [low, high] = [show(t.low), show(t.high)];
    const unit = high.replace(/^[-\d.,\s]+/, '');
    const lowNumber = unit && low.endsWith(unit) ? low.slice(0, -unit.length).trim() : low;
    return `${name} ${lowNumber}–${high}`;
  }
  if (t.low !== null) return `${name} ≥ ${show(t.low)}`;
  return `${name} ≤ ${show(t.high)}`;
}

export function PatientCourses({ patientId }: { patientId: string }) {
  const courses = usePatientCourses(patientId);
  if (courses.isPending) return <Loading what="courses" />;
  if (courses.isError) return <ErrorMessage error={courses.error} what="load courses" />;
  if (courses.data.items.length === 0) return <Empty>No course yet.</Empty>;
  return (
    <ul className="flex flex-col gap-1 text-sm">
      {courses.data.items.map((c) => (
        <li key={c.id} className="rounded border border-slate-200 px-2 py-1">
          <Link to={paths.course.getHref(c.id)} className="font-medium text-tide-800 underline">
            <span className="capitalize">{c.drug}</span> · {c.indication}
          </Link>
          <div className="text-xs text-slate-600">
            {c.status} · target {describeTarget(c.target)} · model {c.modelId} v{c.modelVersion}
          </div>
        </li>
      ))}
    </ul>
  );
}
