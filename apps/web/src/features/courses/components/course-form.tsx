import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { z } from 'zod';
import type { Drug } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { FormErrors } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { applyServerErrors } from '../../../lib/form-errors';
import { createCourseInputSchema, useCreateCourse } from '../api/create-course';
import { useDrugModels } from '../api/get-drug-models';

/**
 * Default targets per drug, editable on the form.
 * Vancomycin AUC24 400–600 mg·h/L for MIC 1 mg/L (Source: Rybak et al. 2020 consensus guideline).
 * Aminoglycosides peak/MIC ≥ 8 (from memory: Moore 1987). Phenytoin total 10–20 mg/L (from memory:
 * Winter, Basic Clinical Pharmacokinetics).
 */
export const DEFAULT_TARGETS: Record<
  Drug,
  { metric: 'auc24' | 'peak-mic-ratio' | 'trough'; low: string; high: string }
> = {
  vancomycin: { metric: 'auc24', low: '400', high: '600' },
  gentamicin: { metric: 'peak-mic-ratio', low: '8', high: '' },
  tobramycin: { metric: 'peak-mic-ratio', low: '8', high: '' },
  amikacin: { metric: 'peak-mic-ratio', low: '8', high: '' },
  phenytoin: { metric: 'trough', low: '10', high: '20' },
};

const METRIC_LABELS = {
  auc24: 'AUC24 (mg·h/L)',
  trough: 'Trough (mg/L)',
  peak: 'Peak (mg/L)',
  'peak-mic-ratio': 'Peak/MIC',
  css: 'Steady-state concentration (mg/L)',
};

const optionalNumber = (v: string) => (v.trim() === '' ? null : Number(v));

const formSchema = z
  .object({
    drug: z.enum(['vancomycin', 'gentamicin', 'tobramycin', 'amikacin', 'phenytoin']),
    modelId: z.string().min(1, 'choose a model'),
    indication: z.string(),
    micMgL: z.string(),
    micMethod: z.string(),
    metric: z.enum(['auc24', 'trough', 'peak', 'peak-mic-ratio', 'css']),
    low: z.string(),
    high: z.string(),
  })
  .transform((v): z.input<typeof createCourseInputSchema> => ({
    drug: v.drug,
    modelId: v.modelId,
    indication: v.indication,
    micMgL: optionalNumber(v.micMgL),
    micMethod: v.micMethod.trim() || null,
    target: { metric: v.metric, low: optionalNumber(v.low), high: optionalNumber(v.high) },
  }))
  .pipe(createCourseInputSchema);

const fields = ['drug', 'modelId', 'indication', 'micMgL', 'micMethod', 'low', 'high'] as const;

export function CourseForm({ patientId }: { patientId: string }) {
  const navigate = useNavigate();
  const create = useCreateCourse(patientId);
  const [other, setOther] = useState<string[]>([]);
  const form = useForm<z.input<typeof formSchema>, unknown, z.output<typeof formSchema>>({
    resolver: zodResolver(formSchema),
    defaultValues: {
      drug: 'vancomycin',
      modelId: '',
      indication: '',
      micMgL: '1',
      micMethod: 'broth microdilution',
      ...DEFAULT_TARGETS.vancomycin,
    },
  });
  const drug = useWatch({ control: form.control, name: 'drug' });
  const models = useDrugModels(drug);
  const modelId = useWatch({ control: form.control, name: 'modelId' });
  const firstModel = models.data?.items[0]?.id;
  useEffect(() => {
    if (firstModel && !modelId) form.setValue('modelId', firstModel);
  }, [firstModel, modelId, form]);
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (input) => {
    setOther([]);
    try {
      const course = await create.mutateAsync(input);
      navigate(paths.course.getHref(course.id));
    } catch (error) {
      setOther(
        applyServerErrors(error, form.setError, fields, {
          'target.low': 'low',
          'target.high': 'high',
          target: 'low',
        }),
      );
    }
  });
  return (
    <form
      aria-label="Start a course"
      onSubmit={onSubmit}
      noValidate
      className="grid grid-cols-2 gap-2"
    >
      <Field label="Drug" error={errors.drug?.message}>
        {(a) => (
          <select
            {...a}
            className={inputClass}
            {...form.register('drug', {
              onChange: (e) => {
                const d = e.target.value as Drug;
                form.setValue('modelId', '');
                form.setValue('metric', DEFAULT_TARGETS[d].metric);
                form.setValue('low', DEFAULT_TARGETS[d].low);
                form.setValue('high', DEFAULT_TARGETS[d].high);
              },
            })}
          >
            {Object.keys(DEFAULT_TARGETS).map((d) => (
              <option key={d}>{d}</option>
            ))}
          </select>
        )}
      </Field>
      <Field
        label="Population model"
        error={errors.modelId?.message}
        hint={models.isError ? models.error.message : undefined}
      >
        {(a) => (
          <select {...a} className={inputClass} {...form.register('modelId')}>
            <option value="">{models.isPending ? 'loading…' : '—'}</option>
            {models.data?.items.map((m) => (
              <option key={`${m.id}-${m.version}`} value={m.id}>
                {m.name} (v{m.version})
              </option>
            ))}
          </select>
        )}
      </Field>
      <Field label="Indication" error={errors.indication?.message} className="col-span-2">
        {(a) => <input {...a} className={inputClass} {...form.register('indication')} />}
      </Field>
      <Field label="MIC (mg/L)" error={errors.micMgL?.message}>
        {(a) => (
          <input {...a} inputMode="decimal" className={inputClass} {...form.register('micMgL')} />
        )}
      </Field>
      <Field label="MIC method" error={errors.micMethod?.message}>
        {(a) => <input {...a} className={inputClass} {...form.register('micMethod')} />}
      </Field>
      <Field label="Target" error={errors.metric?.message} className="col-span-2">
        {(a) => (
          <select {...a} className={inputClass} {...form.register('metric')}>
            {Object.entries(METRIC_LABELS).map(([k, l]) => (
              <option key={k} value={k}>
                {l}
              </option>
            ))}
          </select>
        )}
      </Field>
      <Field label="Target low" error={errors.low?.message}>
        {(a) => (
          <input {...a} inputMode="decimal" className={inputClass} {...form.register('low')} />
        )}
      </Field>
      <Field label="Target high" error={errors.high?.message}>
        {(a) => (
          <input {...a} inputMode="decimal" className={inputClass} {...form.register('high')} />
        )}
      </Field>
      <div className="col-span-2">
        <FormErrors messages={other} />
        <Button type="submit" disabled={form.formState.isSubmitting} className="mt-1">
          Start course
        </Button>
      </div>
    </form>
  );
}
