import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { drugSchema, type Drug, type DrugModel } from '@ebbtide/contracts';
import { Button } from '../../../components/ui/button';
import { Field, inputClass } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/panel';
import { FormErrors } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { applyServerErrors } from '../../../lib/form-errors';
import { useCreateDrugModel } from '../api/create-drug-model';

interface FormValues {
  id: string;
  drug: Drug;
  name: string;
  source: string;
  plausibleMin: string;
  plausibleMax: string;
  definitionJson: string;
}

const FIELDS = ['id', 'drug', 'name', 'source', 'plausibleMin', 'plausibleMax'] as const;
const FIELD_MAP: Record<string, string> = {
  'plausibleSingleDoseMg.min': 'plausibleMin',
  'plausibleSingleDoseMg.max': 'plausibleMax',
  plausibleSingleDoseMg: 'plausibleMax',
};

/** Splits the server's field errors: the model body's problems go beside the JSON. */
function definitionProblems(error: unknown): string[] {
  if (!(error instanceof ApiError)) return [];
  return Object.entries(error.body.fieldErrors ?? {})
    .filter(([k]) => k === 'definition' || k.startsWith('definition.'))
    .flatMap(([k, messages]) =>
      k === 'definition' ? messages : messages.map((m) => `${k.slice(11)}: ${m}`),
    );
}

/**
 * Admin: store a new version of this model (same id) or a new model (new id). The body is the
 * engine's model object as JSON; the server checks it with the engine's validator. A refused
 * save keeps everything typed.
 */
export function AddModelVersionForm({ base }: { base: DrugModel }) {
  const navigate = useNavigate();
  const create = useCreateDrugModel();
  const [otherProblems, setOtherProblems] = useState<string[]>([]);
  const [definitionErrors, setDefinitionErrors] = useState<string[]>([]);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<FormValues>({
    defaultValues: {
      id: base.id,
      drug: base.drug,
      name: base.name,
      source: base.source,
      plausibleMin: String(base.plausibleSingleDoseMg.min),
      plausibleMax: String(base.plausibleSingleDoseMg.max),
      definitionJson: JSON.stringify(base.definition, null, 2),
    },
  });

  const onSubmit = handleSubmit((values) => {
    setOtherProblems([]);
    setDefinitionErrors([]);
    let definition: Record<string, unknown>;
    try {
      const parsed: unknown = JSON.parse(values.definitionJson);
      if (!parsed || typeof parsed !== 'object' || Array.isArray(parsed))
        throw new Error('the model body must be a JSON object');
      definition = parsed as Record<string, unknown>;
    } catch (e) {
      setError('definitionJson', {
        type: 'parse',
        message: `Not valid JSON: ${e instanceof Error ? e.message : String(e)}`,
      });
      return;
    }
    create.mutate(
      {
        id: values.id.trim(),
        drug: values.drug,
        name: values.name,
        source: values.source,
        definition,
        plausibleSingleDoseMg: {
          min: Number(values.plausibleMin),
          max: Number(values.plausibleMax),
        },
      },
      {
        onSuccess: (created) => navigate(paths.drugModel.getHref(created.id, created.version)),
        onError: (error) => {
          setDefinitionErrors(definitionProblems(error));
          setOtherProblems(
            applyServerErrors(error, setError, FIELDS, FIELD_MAP).filter(
              (m) =>
                !m.startsWith('definition') &&
                !(error instanceof ApiError && m === error.body.message),
            ),
          );
        },
      },
    );
  });

  return (
    <Panel title="Add a model version">
      <p className="mb-2 text-sm text-slate-700">
        Keep the id to store version {base.version + 1} of this model, or give a new id for a new
        model. Stored versions never change; courses keep the version they started with.
      </p>
      <form className="grid gap-3 text-sm md:grid-cols-2" onSubmit={onSubmit} noValidate>
        <Field
          label="Model id"
          error={errors.id?.message}
          hint="lower-case letters, digits, dashes"
        >
          {(a) => (
            <input
              {...a}
              {...register('id', { required: 'Give the model id' })}
              className={`${inputClass} font-mono`}
            />
          )}
        </Field>
        <Field label="Drug" error={errors.drug?.message}>
          {(a) => (
            <select {...a} {...register('drug')} className={inputClass}>
              {drugSchema.options.map((d) => (
                <option key={d} value={d}>
                  {d}
                </option>
              ))}
            </select>
          )}
        </Field>
        <Field label="Name" error={errors.name?.message} className="md:col-span-2">
          {(a) => (
            <input
              {...a}
              {...register('name', { required: 'Give the model a name' })}
              className={inputClass}
            />
          )}
        </Field>
        <Field label="Source" error={errors.source?.message} className="md:col-span-2">
          {(a) => (
            <input
              {...a}
              {...register('source', { required: 'Name the published source' })}
              className={inputClass}
            />
          )}
        </Field>
        <Field label="Plausible single dose, lowest (mg)" error={errors.plausibleMin?.message}>
          {(a) => (
            <input
              {...a}
              {...register('plausibleMin')}
              inputMode="decimal"
              className={inputClass}
            />
          )}
        </Field>
        <Field label="Plausible single dose, highest (mg)" error={errors.plausibleMax?.message}>
          {(a) => (
            <input
              {...a}
              {...register('plausibleMax')}
              inputMode="decimal"
              className={inputClass}
            />
          )}
        </Field>
        <Field
          label="Model body (JSON)"
          error={errors.definitionJson?.message}
          hint="The engine's model object: structure, routes, parameters, variability, residual error, covariates, practical settings, references."
          className="md:col-span-2"
        >
          {(a) => (
            <textarea
              {...a}
              {...register('definitionJson', { required: 'Give the model body' })}
              rows={16}
              spellCheck={false}
              className={`${inputClass} font-mono text-xs`}
            />
          )}
        </Field>
        {definitionErrors.length > 0 && (
          <div className="md:col-span-2">
            <p className="text-xs font-semibold text-red-800">
              Problems the engine found in the model body
            </p>
            <ul
              aria-label="Problems in the model body"
              className="list-disc rounded border border-red-300 bg-red-50 py-2 pr-3 pl-7 text-xs text-red-800"
            >
              {definitionErrors.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          </div>
        )}
        {create.isError && (
          <div className="space-y-1 md:col-span-2">
            <p role="alert" className="text-sm font-medium text-red-800">
              Not saved: {create.error instanceof ApiError ? create.error.body.message : 'error'}.
              Nothing you typed was lost; correct it and save again.
            </p>
            <FormErrors messages={otherProblems} />
          </div>
        )}
        <div className="md:col-span-2">
          <Button type="submit" disabled={create.isPending}>
            {create.isPending ? 'Saving…' : 'Save the model version'}
          </Button>
        </div>
      </form>
    </Panel>
  );
}
