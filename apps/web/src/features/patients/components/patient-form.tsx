import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { z } from 'zod';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { FormErrors } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { applyServerErrors } from '../../../lib/form-errors';
import { createPatientInputSchema, useCreatePatient } from '../api/create-patient';

const formSchema = z
  .object({
    mrn: z.string(),
    givenName: z.string(),
    familyName: z.string(),
    sex: z.enum(['female', 'male']),
    birthDate: z.string(),
    ward: z.string(),
  })
  .superRefine((v, ctx) => {
    const born = Date.parse(v.birthDate);
    if (!Number.isNaN(born) && born > Date.now()) {
      ctx.addIssue({
        code: 'custom',
        path: ['birthDate'],
        message: 'the birth date is in the future',
      });
    }
  })
  .transform((v): z.input<typeof createPatientInputSchema> => ({
    isTeaching: false as const,
    mrn: v.mrn,
    givenName: v.givenName,
    familyName: v.familyName,
    sex: v.sex,
    birthDate: v.birthDate,
    ward: v.ward.trim() ? v.ward.trim() : null,
  }))
  .pipe(createPatientInputSchema);
type FormInput = z.input<typeof formSchema>;
type FormOutput = z.output<typeof formSchema>;

const fields = ['mrn', 'givenName', 'familyName', 'sex', 'birthDate', 'ward'] as const;
const WARDS = ['4 North', 'ICU', 'Renal unit', 'Paediatrics'];

export function PatientForm() {
  const navigate = useNavigate();
  const create = useCreatePatient();
  const [other, setOther] = useState<string[]>([]);
  const form = useForm<FormInput, unknown, FormOutput>({
    resolver: zodResolver(formSchema),
    defaultValues: {
      mrn: '',
      givenName: '',
      familyName: '',
      sex: 'female',
      birthDate: '',
      ward: '',
    },
  });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (input) => {
    setOther([]);
    try {
      const patient = await create.mutateAsync(input);
      navigate(paths.patient.getHref(patient.id));
    } catch (error) {
      setOther(applyServerErrors(error, form.setError, fields));
    }
  });
  return (
    <form
      aria-label="Add a patient"
      className="grid grid-cols-2 gap-2"
      onSubmit={onSubmit}
      noValidate
    >
      <Field label="Family name" error={errors.familyName?.message}>
        {(a) => (
          <input
            {...a}
            className={inputClass}
            autoComplete="off"
            {...form.register('familyName')}
          />
        )}
      </Field>
      <Field label="Given name" error={errors.givenName?.message}>
        {(a) => (
          <input {...a} className={inputClass} autoComplete="off" {...form.register('givenName')} />
        )}
      </Field>
      <Field label="MRN" error={errors.mrn?.message}>
        {(a) => (
          <input {...a} className={inputClass} autoComplete="off" {...form.register('mrn')} />
        )}
      </Field>
      <Field label="Date of birth" error={errors.birthDate?.message}>
        {(a) => <input {...a} type="date" className={inputClass} {...form.register('birthDate')} />}
      </Field>
      <Field label="Sex" error={errors.sex?.message} hint="as used by the renal equations">
        {(a) => (
          <select {...a} className={inputClass} {...form.register('sex')}>
            <option value="female">female</option>
            <option value="male">male</option>
          </select>
        )}
      </Field>
      <Field label="Ward" error={errors.ward?.message}>
        {(a) => (
          <select {...a} className={inputClass} {...form.register('ward')}>
            <option value="">—</option>
            {WARDS.map((w) => (
              <option key={w}>{w}</option>
            ))}
          </select>
        )}
      </Field>
      <div className="col-span-2">
        <FormErrors messages={other} />
        <Button type="submit" disabled={form.formState.isSubmitting} className="mt-1">
          Add patient
        </Button>
      </div>
    </form>
  );
}
