import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { z } from 'zod';
import type { Dose } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { StaleEdit } from '../../../components/ui/stale-edit';
import { FormErrors } from '../../../components/ui/states';
import { isStaleEdit, type StaleEditBody } from '../../../lib/api-client';
import {
  echoAmount,
  echoHours,
  formatNumber,
  formatRelativeHour,
  fromLocalInput,
  toLocalInput,
} from '../../../lib/clinical-format';
import { applyServerErrors } from '../../../lib/form-errors';
import { createDoseInputSchema, useCreateDose } from '../api/create-dose';
import { useUpdateDose } from '../api/update-dose';

const fields = [
  'amount',
  'unit',
  'route',
  'startAt',
  'startHour',
  'infusionMinutes',
  'administrationStatus',
  'note',
] as const;

const formShape = z.object({
  amount: z.string(),
  unit: z.enum(['mg', 'g']),
  route: z.enum(['iv-infusion', 'iv-bolus', 'oral', 'im']),
  startAt: z.string(),
  startHour: z.string(),
  infusionMinutes: z.string(),
  administrationStatus: z.enum(['given', 'missed', 'partial']),
  note: z.string(),
});
type FormValues = z.input<typeof formShape>;

/** The mg/g check: an amount outside the plausible single dose that fits in the other unit. */
export function unitSlip(
  amount: number,
  unit: 'mg' | 'g',
  plausible: { min: number; max: number },
): string | null {
  const mg = unit === 'g' ? amount * 1000 : amount;
  if (mg >= plausible.min && mg <= plausible.max) return null;
  const range = `${formatNumber(plausible.min)}–${formatNumber(plausible.max)} mg`;
  if (unit === 'mg' && amount * 1000 >= plausible.min && amount * 1000 <= plausible.max)
    return `${formatNumber(amount)} mg is outside the plausible single dose (${range}); ${formatNumber(amount)} g = ${formatNumber(amount * 1000)} mg — choose the unit you meant.`;
  if (unit === 'g' && amount >= plausible.min && amount <= plausible.max)
    return `${echoAmount(amount, 'g')} is outside the plausible single dose (${range}); did you mean ${formatNumber(amount)} mg?`;
  return `${echoAmount(amount, unit)} is outside the plausible single dose (${range}).`;
}

function makeSchema(isTeaching: boolean, plausible: { min: number; max: number } | null) {
  return formShape
    .superRefine((v, ctx) => {
      const issue = (path: string, message: string) =>
        ctx.addIssue({ code: 'custom', path: [path], message });
      const amount = Number(v.amount);
      if (!v.amount.trim() || !Number.isFinite(amount) || amount <= 0)
        issue('amount', 'a positive amount');
      else if (plausible) {
        const slip = unitSlip(amount, v.unit, plausible);
        if (slip) issue('amount', slip);
      }
      if (v.route === 'iv-infusion') {
        const m = Number(v.infusionMinutes);
        if (!v.infusionMinutes.trim() || !Number.isFinite(m) || m <= 0)
          issue('infusionMinutes', 'an infusion needs its duration in minutes');
        else if (m > 48 * 60) issue('infusionMinutes', 'over 48 h is implausible');
      }
      if (isTeaching) {
        if (!v.startHour.trim() || !Number.isFinite(Number(v.startHour)))
          issue('startHour', 'hours from the first dose, e.g. 0 or 12');
      } else {
        const at = fromLocalInput(v.startAt);
        if (!at) issue('startAt', 'the date and time the dose started');
        else if (Date.parse(at) > Date.now() + 5 * 60_000)
          issue('startAt', 'this time is in the future: record doses once given');
      }
    })
    .transform((v): z.input<typeof createDoseInputSchema> => ({
      amount: Number(v.amount),
      unit: v.unit,
      route: v.route,
      ...(isTeaching
        ? { startHour: Number(v.startHour) }
        : { startAt: fromLocalInput(v.startAt) as string }),
      ...(v.route === 'iv-infusion' ? { infusionMinutes: Number(v.infusionMinutes) } : {}),
      administrationStatus: v.administrationStatus,
      ...(v.note.trim() ? { note: v.note.trim() } : {}),
    }))
    .pipe(createDoseInputSchema);
}

export function valuesOf(d: Dose | undefined, defaultInfusionMinutes: number): FormValues {
  return {
    amount: d ? String(d.amount) : '',
    unit: d?.unit ?? 'mg',
    route: d?.route ?? 'iv-infusion',
    startAt: d ? toLocalInput(d.startAt) : toLocalInput(new Date().toISOString()),
    startHour: d?.startHour !== null && d?.startHour !== undefined ? String(d.startHour) : '',
    infusionMinutes: d?.durationH
      ? String(Math.round(d.durationH * 60))
      : String(defaultInfusionMinutes),
    administrationStatus: d?.administrationStatus ?? 'given',
    note: d?.note ?? '',
  };
}

export function DoseForm({
  courseId,
  isTeaching,
  plausible,
  dose,
  onDone,
}: {
  courseId: string;
  isTeaching: boolean;
  plausible: { min: number; max: number } | null;
  /** Editing this dose; absent: a new dose. */
  dose?: Dose;
  onDone?: () => void;
}) {
  const schema = useMemo(() => makeSchema(isTeaching, plausible), [isTeaching, plausible]);
  const create = useCreateDose(courseId);
  const update = useUpdateDose(courseId);
  const [other, setOther] = useState<string[]>([]);
  const [stale, setStale] = useState<StaleEditBody | null>(null);
  const [version, setVersion] = useState(dose?.version);
  const form = useForm<FormValues, unknown, z.output<typeof schema>>({
    resolver: zodResolver(schema),
    defaultValues: valuesOf(dose, 60),
  });
  const { errors } = form.formState;
  const [amount, unit, route, minutes, startHour] = useWatch({
    control: form.control,
    name: ['amount', 'unit', 'route', 'infusionMinutes', 'startHour'],
  });
  const echo =
    Number(amount) > 0
      ? `${echoAmount(Number(amount), unit)}${route === 'iv-infusion' && Number(minutes) > 0 ? ` over ${echoHours(Number(minutes) / 60)}` : ''}`
      : null;

  const onSubmit = form.handleSubmit(async (input) => {
    setOther([]);
    setStale(null);
    try {
      if (dose)
        await update.mutateAsync({
          id: dose.id,
          input: { ...input, version: version ?? dose.version },
        });
      else {
        await create.mutateAsync(input);
        form.reset({ ...form.getValues(), amount: '', note: '' });
      }
      onDone?.();
    } catch (error) {
      if (isStaleEdit(error)) setStale(error.body);
      else
        setOther(
          applyServerErrors(error, form.setError, fields, {
            endAt: 'infusionMinutes',
            endHour: 'infusionMinutes',
          }),
        );
    }
  });

  return (
    <form
      aria-label={dose ? 'Edit dose' : 'Add a dose'}
      onSubmit={onSubmit}
      noValidate
      className="flex flex-wrap items-start gap-2"
    >
      <Field
        label="Amount"
        error={errors.amount?.message}
        hint={echo ?? undefined}
        className="w-44"
      >
        {(a) => (
          <input {...a} inputMode="decimal" className={inputClass} {...form.register('amount')} />
        )}
      </Field>
      <Field label="Unit" error={errors.unit?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('unit')}>
            <option value="mg">mg</option>
            <option value="g">g</option>
          </select>
        )}
      </Field>
      <Field label="Route" error={errors.route?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('route')}>
            <option value="iv-infusion">IV infusion</option>
            <option value="iv-bolus">IV bolus</option>
            <option value="oral">oral</option>
            <option value="im">IM</option>
          </select>
        )}
      </Field>
      {isTeaching ? (
        <Field
          label="Start (hours from first dose)"
          error={errors.startHour?.message}
          hint={
            startHour && Number.isFinite(Number(startHour))
              ? `= ${formatRelativeHour(Number(startHour))}`
              : undefined
          }
          className="w-40"
        >
          {(a) => (
            <input
              {...a}
              inputMode="decimal"
              className={inputClass}
              {...form.register('startHour')}
            />
          )}
        </Field>
      ) : (
        <Field label="Started at" error={errors.startAt?.message}>
          {(a) => (
            <input
              {...a}
              type="datetime-local"
              className={inputClass}
              {...form.register('startAt')}
            />
          )}
        </Field>
      )}
      {route === 'iv-infusion' && (
        <Field label="Infusion (min)" error={errors.infusionMinutes?.message} className="w-28">
          {(a) => (
            <input
              {...a}
              inputMode="numeric"
              className={inputClass}
              {...form.register('infusionMinutes')}
            />
          )}
        </Field>
      )}
      <Field label="Given" error={errors.administrationStatus?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('administrationStatus')}>
            <option value="given">given</option>
            <option value="partial">partly given</option>
            <option value="missed">missed</option>
          </select>
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
              form.reset(valuesOf(stale.current as unknown as Dose, 60));
              setVersion(stale.currentVersion);
              setStale(null);
            }}
          />
        )}
        <div className="flex gap-2">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            {dose ? 'Save dose' : 'Add dose'}
          </Button>
          {onDone && dose && (
            <Button variant="quiet" onClick={onDone}>
              Cancel
            </Button>
          )}
        </div>
      </div>
    </form>
  );
}
