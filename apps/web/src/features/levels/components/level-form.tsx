import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { z } from 'zod';
import type { Dose, Level } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { StaleEdit } from '../../../components/ui/stale-edit';
import { FormErrors } from '../../../components/ui/states';
import { isStaleEdit, type StaleEditBody } from '../../../lib/api-client';
import {
  formatClinicalTime,
  formatRelativeHour,
  fromLocalInput,
  toLocalInput,
} from '../../../lib/clinical-format';
import { applyServerErrors } from '../../../lib/form-errors';
import { hoursFrom } from '../../../lib/clinical-format';
import { infusionRunningAt } from '../../courses/utils/course-time';
import { createLevelInputSchema, useCreateLevel } from '../api/create-level';
import { useUpdateLevel } from '../api/update-level';

export const SAMPLE_KINDS = {
  trough: 'trough (before a dose)',
  peak: 'peak (after the infusion)',
  random: 'random',
  'during-infusion': 'during the infusion',
  'pre-dialysis': 'before dialysis',
  'post-dialysis': 'after dialysis',
} as const;

const fields = [
  'value',
  'unit',
  'collectedAt',
  'collectedHour',
  'sampleKind',
  'assayLowerLimit',
  'note',
] as const;

/**
 * Highest plausible total drug level, mg/L, above which a result is refused as a likely unit or
 * decimal slip (common practice: far above any toxic level of these drugs).
 */
export const MAX_PLAUSIBLE_LEVEL_MGL = 200;

const formShape = z.object({
  value: z.string(),
  unit: z.enum(['mg/L', 'ug/mL', 'umol/L']),
  collectedAt: z.string(),
  collectedHour: z.string(),
  sampleKind: z.enum([
    'trough',
    'peak',
    'random',
    'during-infusion',
    'pre-dialysis',
    'post-dialysis',
  ]),
  assayLowerLimit: z.string(),
  note: z.string(),
});
type FormValues = z.input<typeof formShape>;

function makeSchema(
  isTeaching: boolean,
  doses: Dose[],
  reference: string | null,
  siFactor: number | null,
) {
  return formShape
    .superRefine((v, ctx) => {
      const issue = (path: string, message: string) =>
        ctx.addIssue({ code: 'custom', path: [path], message });
      const value = Number(v.value);
      if (!v.value.trim() || !Number.isFinite(value) || value < 0)
        issue('value', 'a concentration of 0 or more');
      else {
        const mgL = v.unit === 'umol/L' ? (siFactor ? value / siFactor : null) : value;
        if (mgL !== null && mgL > MAX_PLAUSIBLE_LEVEL_MGL)
          issue(
            'value',
            `${v.value} ${v.unit} is implausibly high (over ${MAX_PLAUSIBLE_LEVEL_MGL} mg/L): check the unit and the decimal point`,
          );
      }
      const at = isTeaching ? undefined : fromLocalInput(v.collectedAt);
      if (isTeaching && (!v.collectedHour.trim() || !Number.isFinite(Number(v.collectedHour))))
        issue('collectedHour', 'hours from the first dose');
      if (!isTeaching && !at)
        issue('collectedAt', 'the time the sample was collected (not when it reached the lab)');
      if (at && Date.parse(at) > Date.now() + 5 * 60_000)
        issue('collectedAt', 'this time is in the future');
      const hour = isTeaching
        ? Number(v.collectedHour)
        : at
          ? hoursFrom(reference, { at, hour: null })
          : null;
      if (hour !== null && Number.isFinite(hour) && v.sampleKind !== 'during-infusion') {
        const running = infusionRunningAt(doses, reference, hour);
        if (running)
          issue(
            isTeaching ? 'collectedHour' : 'collectedAt',
            `collected while the ${running.echo} infusion started ${formatClinicalTime({ at: running.startAt, hour: running.startHour })} was running: correct the time, or choose "during the infusion" deliberately`,
          );
      }
      if (v.assayLowerLimit.trim() && !(Number(v.assayLowerLimit) >= 0))
        issue('assayLowerLimit', 'a number of 0 or more');
    })
    .transform((v): z.input<typeof createLevelInputSchema> => ({
      value: Number(v.value),
      unit: v.unit,
      ...(isTeaching
        ? { collectedHour: Number(v.collectedHour) }
        : { collectedAt: fromLocalInput(v.collectedAt) as string }),
      sampleKind: v.sampleKind,
      ...(v.assayLowerLimit.trim() ? { assayLowerLimit: Number(v.assayLowerLimit) } : {}),
      ...(v.note.trim() ? { note: v.note.trim() } : {}),
    }))
    .pipe(createLevelInputSchema);
}

function valuesOf(l: Level | undefined): FormValues {
  return {
    value: l ? String(l.value) : '',
    unit: l?.unit ?? 'mg/L',
    collectedAt: l ? toLocalInput(l.collectedAt) : toLocalInput(new Date().toISOString()),
    collectedHour:
      l?.collectedHour !== null && l?.collectedHour !== undefined ? String(l.collectedHour) : '',
    sampleKind: l?.sampleKind ?? 'trough',
    assayLowerLimit:
      l?.assayLowerLimit !== null && l?.assayLowerLimit !== undefined
        ? String(l.assayLowerLimit)
        : '',
    note: l?.note ?? '',
  };
}

export function LevelForm({
  courseId,
  isTeaching,
  doses,
  reference,
  siFactor,
  level,
  onDone,
}: {
  courseId: string;
  isTeaching: boolean;
  doses: Dose[];
  reference: string | null;
  siFactor: number | null;
  level?: Level;
  onDone?: () => void;
}) {
  const schema = useMemo(
    () => makeSchema(isTeaching, doses, reference, siFactor),
    [isTeaching, doses, reference, siFactor],
  );
  const create = useCreateLevel(courseId);
  const update = useUpdateLevel(courseId);
  const [other, setOther] = useState<string[]>([]);
  const [stale, setStale] = useState<StaleEditBody | null>(null);
  const [version, setVersion] = useState(level?.version);
  const form = useForm<FormValues, unknown, z.output<typeof schema>>({
    resolver: zodResolver(schema),
    defaultValues: valuesOf(level),
  });
  const { errors } = form.formState;
  const [value, unit, hour] = useWatch({
    control: form.control,
    name: ['value', 'unit', 'collectedHour'],
  });
  const echo =
    unit === 'umol/L' && siFactor && Number(value) > 0
      ? `${value} µmol/L = ${(Number(value) / siFactor).toFixed(1)} mg/L`
      : Number(value) >= 0 && value
        ? `${value} ${unit === 'ug/mL' ? 'µg/mL (= mg/L)' : unit}`
        : undefined;
  const onSubmit = form.handleSubmit(async (input) => {
    setOther([]);
    setStale(null);
    try {
      if (level)
        await update.mutateAsync({
          id: level.id,
          input: { ...input, version: version ?? level.version },
        });
      else {
        await create.mutateAsync(input);
        form.reset({ ...form.getValues(), value: '', note: '' });
      }
      onDone?.();
    } catch (error) {
      if (isStaleEdit(error)) setStale(error.body);
      else setOther(applyServerErrors(error, form.setError, fields));
    }
  });
  return (
    <form
      aria-label={level ? 'Edit level' : 'Add a level'}
      onSubmit={onSubmit}
      noValidate
      className="flex flex-wrap items-start gap-2"
    >
      <Field label="Concentration" error={errors.value?.message} hint={echo} className="w-40">
        {(a) => (
          <input {...a} inputMode="decimal" className={inputClass} {...form.register('value')} />
        )}
      </Field>
      <Field label="Level unit" error={errors.unit?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('unit')}>
            <option value="mg/L">mg/L</option>
            <option value="ug/mL">µg/mL</option>
            <option value="umol/L">µmol/L</option>
          </select>
        )}
      </Field>
      {isTeaching ? (
        <Field
          label="Collected (hours from first dose)"
          error={errors.collectedHour?.message}
          hint={
            hour && Number.isFinite(Number(hour))
              ? `= ${formatRelativeHour(Number(hour))}`
              : undefined
          }
          className="w-48"
        >
          {(a) => (
            <input
              {...a}
              inputMode="decimal"
              className={inputClass}
              {...form.register('collectedHour')}
            />
          )}
        </Field>
      ) : (
        <Field label="Collected at" error={errors.collectedAt?.message} className="max-w-72">
          {(a) => (
            <input
              {...a}
              type="datetime-local"
              className={inputClass}
              {...form.register('collectedAt')}
            />
          )}
        </Field>
      )}
      <Field label="Sample" error={errors.sampleKind?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('sampleKind')}>
            {Object.entries(SAMPLE_KINDS).map(([k, l]) => (
              <option key={k} value={k}>
                {l}
              </option>
            ))}
          </select>
        )}
      </Field>
      <Field
        label="Assay lower limit"
        error={errors.assayLowerLimit?.message}
        hint="same unit; optional"
        className="w-32"
      >
        {(a) => (
          <input
            {...a}
            inputMode="decimal"
            className={inputClass}
            {...form.register('assayLowerLimit')}
          />
        )}
      </Field>
      <Field label="Note" error={errors.note?.message} className="min-w-32 flex-1">
        {(a) => <input {...a} className={inputClass} {...form.register('note')} />}
      </Field>
      <div className="flex w-full flex-col gap-1">
        <FormErrors messages={other} />
        {stale && (
          <StaleEdit
            body={stale}
            onDismiss={() => {
              setVersion(stale.currentVersion);
              setStale(null);
            }}
            onReload={() => {
              form.reset(valuesOf(stale.current as unknown as Level));
              setVersion(stale.currentVersion);
              setStale(null);
            }}
          />
        )}
        <div className="flex gap-2">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            {level ? 'Save level' : 'Add level'}
          </Button>
          {onDone && level && (
            <Button variant="quiet" onClick={onDone}>
              Cancel
            </Button>
          )}
        </div>
      </div>
    </form>
  );
}
