import { useState } from 'react';
import { Panel } from '../../../components/ui/panel';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { useDoses } from '../../doses/api/get-doses';
import { DosesTable } from '../../doses/components/doses-table';
import { useLevels } from '../../levels/api/get-levels';
import { LevelsTable } from '../../levels/components/levels-table';
import { useDrugModel } from '../api/get-drug-model';
import { useSimulation } from '../api/simulate-course';
import { referenceAt } from '../utils/course-time';
import { useCourseContext } from './course-layout';
import { TimelineChart } from './timeline-chart';

/** The course's record: the timeline, the doses and the levels. */
export function CourseRecord() {
  const { course, patient, canEdit } = useCourseContext();
  const doses = useDoses(course.id);
  const levels = useLevels(course.id);
  const model = useDrugModel(course.modelId, course.modelVersion);
  const [curve, setCurve] = useState<'none' | 'population' | 'map'>('none');
  const simulation = useSimulation(
    course.id,
    { parameters: curve === 'map' ? 'map' : 'population' },
    curve !== 'none' && (doses.data?.items.length ?? 0) > 0,
  );
  const siFactor =
    (model.data?.definition.practical as { siFactor?: number } | undefined)?.siFactor ?? null;
  const plausible = model.data?.plausibleSingleDoseMg ?? null;
  const reference = referenceAt(doses.data?.items ?? []);

  return (
    <div className="flex flex-col gap-4">
      <Panel
        title="Timeline"
        actions={
          <label className="flex items-center gap-1 text-xs">
            Predicted curve
            <select
              className="rounded border border-slate-300 px-1 py-0.5 text-xs"
              value={curve}
              onChange={(e) => setCurve(e.target.value as typeof curve)}
            >
              <option value="none">none</option>
              <option value="population">population model</option>
              <option value="map">Bayesian fit</option>
            </select>
          </label>
        }
      >
        {(doses.isPending || levels.isPending) && <Loading what="the timeline" />}
        {doses.isError && <ErrorMessage error={doses.error} what="load doses" />}
        {levels.isError && <ErrorMessage error={levels.error} what="load levels" />}
        {doses.data && levels.data && (
          <>
            <TimelineChart
              doses={doses.data.items}
              levels={levels.data.items}
              reference={reference}
              curve={curve !== 'none' ? simulation.data?.points : undefined}
              curveLabel={curve === 'map' ? 'Bayesian fit' : 'Population model'}
            />
            {simulation.isFetching && <Loading what="the predicted curve" />}
            {simulation.isError && (
              <ErrorMessage error={simulation.error} what="predict the curve" />
            )}
            {simulation.data && curve !== 'none' && (
              <Warnings warnings={simulation.data.warnings} />
            )}
          </>
        )}
      </Panel>
      <div className="grid gap-4 2xl:grid-cols-2">
        <Panel title="Doses given">
          {doses.data ? (
            <DosesTable
              courseId={course.id}
              doses={doses.data.items}
              isTeaching={patient.isTeaching}
              canEdit={canEdit}
              plausible={plausible}
            />
          ) : (
            <Loading what="doses" />
          )}
        </Panel>
        <Panel title="Levels measured">
          {levels.data && doses.data ? (
            <LevelsTable
              courseId={course.id}
              levels={levels.data.items}
              doses={doses.data.items}
              reference={reference}
              isTeaching={patient.isTeaching}
              canEdit={canEdit}
              siFactor={siFactor}
            />
          ) : (
            <Loading what="levels" />
          )}
        </Panel>
      </div>
    </div>
  );
}
