import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { z } from 'zod';
import { covariateUnits, type CovariateKind, type DialysisStatus } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { FormErrors } from '../../../components/ui/states';
import { formatRelativeHour, fromLocalInput, toLocalInput } from '../../../lib/clinical-format';
import { applyServerErrors } from '../../../lib/form-errors';
import { createCovariateInputSchema, useCreateCovariate } from '../api/create-covariate';

export const KIND_LABELS: Record<CovariateKind, string> = {
  weight: 'Weight',
  height: 'Height',
  'serum-creatinine': 'Serum creatinine',
  albumin: 'Albumin',
  dialysis: 'Dialysis status',
};

const UNIT_LABELS: Record<string, string> = {
  kg: 'kg',
  '[lb_av]': 'lb',
  cm: 'cm',
  'umol/L': 'µmol/L',
  'mg/dL': 'mg/dL',
  'g/L': 'g/L',
  'g/dL': 'g/dL',
};

/**
 * Plausible ranges per unit, to catch unit and decimal slips before the server does.
 * Source: common practice (adult and paediatric extremes; the server applies its own checks too).
 */
const PLAUSIBLE: Record<string, { min: number; max: number; other?: string }> = {
  kg: { min: 0.3, max: 350 },
  '[lb_av]': { min: 0.7, max: 770 },
  cm: { min: 25, max: 250 },
  'umol/L': { min: 10, max: 2000, other: 'mg/dL' },
  'mg/dL': { min: 0.1, max: 25, other: 'µmol/L' },
  'g/L': { min: 5, max: 70, other: 'g/dL' },
  'g/dL': { min: 0.5, max: 7, other: 'g/L' },
};

const fields = [
  'kind',
  'value',
  'unit',
  'weightSource',
  'dialysisStatus',
  'observedAt',
  'observedHour',
  'note',
] as const;

function makeSchema(isTeaching: boolean) {
  return z
    .object({
      kind: z.enum(['weight', 'height', 'serum-creatinine', 'albumin', 'dialysis']),
      value: z.string(),
      unit: z.string(),
      weightSource: z.string(),
      dialysisStatus: z.string(),
      observedAt: z.string(),
      observedHour: z.string(),
      note: z.string(),
    })
    .superRefine((v, ctx) => {
      const issue = (path: string, message: string) =>
        ctx.addIssue({ code: 'custom', path: [path], message });
      if (v.kind !== 'dialysis') {
        const n = Number(v.value);
        if (!v.value.trim()) issue('value', 'required');
        else if (!Number.isFinite(n) || n <= 0) issue('value', 'a positive number');
        else {
          const range = PLAUSIBLE[v.unit];
          if (range && (n < range.min || n > range.max)) {
            issue(
              'value',
              `${v.value} ${UNIT_LABELS[v.unit] ?? v.unit} is outside the plausible ${range.min}–${range.max}` +
                (range.other
                  ? `: was it entered in ${range.other}? Choose the unit you meant.`
                  : ''),
            );
          }
        }
        if (v.kind === 'weight' && !v.weightSource)
          issue('weightSource', 'say how the weight was obtained');
      } else if (!v.dialysisStatus) issue('dialysisStatus', 'required');
      if (isTeaching) {
        if (!v.observedHour.trim() || !Number.isFinite(Number(v.observedHour)))
          issue('observedHour', 'hours from the first dose, e.g. -2 or 30');
      } else if (!fromLocalInput(v.observedAt))
        issue('observedAt', 'the date and time it was measured');
      else if (Date.parse(fromLocalInput(v.observedAt) as string) > Date.now() + 5 * 60_000)
        issue('observedAt', 'this time is in the future');
    })
    .transform((v): z.input<typeof createCovariateInputSchema> => ({
      kind: v.kind,
      ...(v.kind === 'dialysis'
        ? { dialysisStatus: v.dialysisStatus as DialysisStatus }
        : { value: Number(v.value), unit: v.unit }),
      ...(v.kind === 'weight'
        ? { weightSource: v.weightSource as 'measured' | 'stated' | 'estimated' }
        : {}),
      ...(isTeaching
        ? { observedHour: Number(v.observedHour) }
        : { observedAt: fromLocalInput(v.observedAt) as string }),
      ...(v.note.trim() ? { note: v.note.trim() } : {}),
    }))
    .pipe(createCovariateInputSchema);
}

export function CovariateForm({
  patientId,
  isTeaching,
}: {
  patientId: string;
  isTeaching: boolean;
}) {
  const schema = useMemo(() => makeSchema(isTeaching), [isTeaching]);
  const create = useCreateCovariate(patientId);
  const [other, setOther] = useState<string[]>([]);
  const [saved, setSaved] = useState<string | null>(null);
  const form = useForm<z.input<typeof schema>, unknown, z.output<typeof schema>>({
    resolver: zodResolver(schema),
    defaultValues: {
      kind: 'weight',
      value: '',
      unit: 'kg',
      weightSource: 'measured',
      dialysisStatus: '',
      observedAt: toLocalInput(new Date().toISOString()),
      observedHour: '',
      note: '',
    },
  });
  const { errors } = form.formState;
  const kind = useWatch({ control: form.control, name: 'kind' });
  const hour = useWatch({ control: form.control, name: 'observedHour' });
  const units = covariateUnits[kind];

  const onSubmit = form.handleSubmit(async (input) => {
    setOther([]);
    setSaved(null);
    try {
      const saved = await create.mutateAsync(input);
      setSaved(`${KIND_LABELS[saved.kind]} saved: ${saved.echo}`);
      form.reset({ ...form.getValues(), value: '', note: '' });
    } catch (error) {
      setOther(applyServerErrors(error, form.setError, fields));
    }
  });

  return (
    <form
      aria-label="Add a covariate"
      onSubmit={onSubmit}
      noValidate
      className="flex flex-wrap items-start gap-3"
    >
      <Field label="Covariate" error={errors.kind?.message}>
        {(a) => (
          <select
            {...a}
            className={inputClass}
            {...form.register('kind', {
              onChange: (e) => {
                const k = e.target.value as CovariateKind;
                form.setValue('unit', covariateUnits[k][0] ?? '');
              },
            })}
          >
            {Object.entries(KIND_LABELS).map(([k, label]) => (
              <option key={k} value={k}>
                {label}
              </option>
            ))}
          </select>
        )}
      </Field>
      {kind !== 'dialysis' ? (
        <>
          <Field label="Value" error={errors.value?.message} className="w-28">
            {(a) => (
              <input
                {...a}
                inputMode="decimal"
                className={inputClass}
                {...form.register('value')}
              />
            )}
          </Field>
          <Field label="Unit" error={errors.unit?.message}>
            {(a) => (
              <select {...a} className={inputClass} {...form.register('unit')}>
                {units.map((u) => (
                  <option key={u} value={u}>
                    {UNIT_LABELS[u] ?? u}
                  </option>
                ))}
              </select>
            )}
          </Field>
        </>
      ) : (
        <Field label="Status" error={errors.dialysisStatus?.message}>
          {(a) => (
            <select {...a} className={inputClass} {...form.register('dialysisStatus')}>
              <option value="">—</option>
              <option value="none">No dialysis</option>
              <option value="intermittent-haemodialysis">Intermittent haemodialysis</option>
              <option value="continuous-rrt">Continuous renal replacement</option>
              <option value="peritoneal">Peritoneal dialysis</option>
            </select>
          )}
        </Field>
      )}
      {kind === 'weight' && (
        <Field label="Weight source" error={errors.weightSource?.message}>
          {(a) => (
            <select {...a} className={inputClass} {...form.register('weightSource')}>
              <option value="measured">measured</option>
              <option value="stated">stated</option>
              <option value="estimated">estimated</option>
            </select>
          )}
        </Field>
      )}
      {isTeaching ? (
        <Field
          label="Hours from first dose"
          error={errors.observedHour?.message}
          hint={
            hour && Number.isFinite(Number(hour))
              ? `= ${formatRelativeHour(Number(hour))}`
              : undefined
          }
          className="w-36"
        >
          {(a) => (
            <input
              {...a}
              inputMode="decimal"
              className={inputClass}
              {...form.register('observedHour')}
            />
          )}
        </Field>
      ) : (
        <Field label="Measured at" error={errors.observedAt?.message}>
          {(a) => (
            <input
              {...a}
              type="datetime-local"
              className={inputClass}
              {...form.register('observedAt')}
            />
          )}
        </Field>
      )}
      <Field label="Note" error={errors.note?.message} className="min-w-40 flex-1">
        {(a) => <input {...a} className={inputClass} {...form.register('note')} />}
      </Field>
      <div className="flex w-full flex-col gap-1">
        <FormErrors messages={other} />
        {saved && (
          <p role="status" className="text-xs text-tide-700">
            {saved}
          </p>
        )}
        <div>
          <Button type="submit" disabled={form.formState.isSubmitting}>
            Save covariate
          </Button>
        </div>
      </div>
    </form>
  );
}
