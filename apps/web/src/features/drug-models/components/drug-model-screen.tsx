import { Link, useParams, useSearchParams } from 'react-router-dom';
import type { DrugModel } from '@ebbtide/contracts';
import { Panel } from '../../../components/ui/panel';
import { ResultCaution } from '../../../components/ui/result-caution';
import { ErrorMessage, Loading } from '../../../components/ui/states';
import { paths } from '../../../config/paths';
import { formatNumber } from '../../../lib/clinical-format';
import { useMe } from '../../auth/api/get-me';
import { useLibraryModel } from '../api/get-drug-model';
import { useLibraryModels } from '../api/get-drug-models';
import {
  anyFromMemory,
  asDefinition,
  eliminationLabel,
  omegaAndCv,
  PARAMETER_NAMES,
  parameterEntries,
  rangeLabel,
  structureLabel,
  targetLabel,
  variabilityEntries,
  type ModelDefinition,
} from '../utils/model-view';
import { AddModelVersionForm } from './add-model-version-form';
import { FromMemory, SourceNote } from './source-note';

const head =
  'border-b border-slate-200 text-xs text-slate-600 [&_th]:py-1 [&_th]:pr-3 [&_th]:font-semibold';
const body = '[&_td]:py-1.5 [&_td]:pr-3 [&_td]:align-top';

function Parameters({ d }: { d: ModelDefinition }) {
  return (
    <table className="w-full text-left text-sm">
      <thead className={head}>
        <tr>
          <th scope="col">Parameter</th>
          <th scope="col">Typical value</th>
          <th scope="col">Covariate relation</th>
          <th scope="col">Source</th>
        </tr>
      </thead>
      <tbody className={body}>
        {parameterEntries(d).map(([name, p]) => (
          <tr key={name} className="border-b border-slate-100">
            <td>{PARAMETER_NAMES[name] ?? name}</td>
            <td className="font-semibold whitespace-nowrap">
              {formatNumber(p.typical, 4)} {p.unit}
            </td>
            <td>
              {p.expression ? (
                <code className="rounded bg-slate-50 px-1 text-xs">{p.expression}</code>
              ) : (
                <span className="text-xs text-slate-500">none (typical for everyone)</span>
              )}
            </td>
            <td>
              <SourceNote p={p} />
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Variability({ d }: { d: ModelDefinition }) {
  const rows = variabilityEntries(d);
  return (
    <>
      <table className="w-full text-left text-sm">
        <thead className={head}>
          <tr>
            <th scope="col">Parameter</th>
            <th scope="col">ω (SD of ln θ)</th>
            <th scope="col">CV%</th>
            <th scope="col">Source</th>
          </tr>
        </thead>
        <tbody className={body}>
          {rows.map(([name, v]) => {
            const x = omegaAndCv(v);
            return (
              <tr key={name} className="border-b border-slate-100">
                <td>{PARAMETER_NAMES[name] ?? name}</td>
                <td>
                  {x.omega === null ? '—' : formatNumber(x.omega, 3)}
                  {x.derived === 'omega' && (
                    <span className="text-xs text-slate-500"> derived</span>
                  )}
                </td>
                <td>
                  {x.cvPercent === null ? '—' : `${formatNumber(x.cvPercent, 1)}%`}
                  {x.derived === 'cv' && <span className="text-xs text-slate-500"> derived</span>}
                </td>
                <td>
                  <SourceNote p={v} />
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-slate-600">
        Log-normal: ω = √ln(1 + CV²). Parameters not listed carry no between-subject variability in
        this model.
      </p>
    </>
  );
}

function ResidualError({ d }: { d: ModelDefinition }) {
  const r = d.residualError;
  if (!r) return <p className="text-sm text-slate-600">Not given.</p>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
      <dt className="text-slate-600">Model</dt>
      <dd>{r.model}</dd>
      {r.additive !== undefined && (
        <>
          <dt className="text-slate-600">Additive</dt>
          <dd>{formatNumber(r.additive, 3)} mg/L</dd>
        </>
      )}
      {r.proportional !== undefined && (
        <>
          <dt className="text-slate-600">Proportional</dt>
          <dd>{formatNumber(r.proportional * 100, 1)}%</dd>
        </>
      )}
      <dt className="text-slate-600">Source</dt>
      <dd>
        <SourceNote p={r} />
      </dd>
    </dl>
  );
}

function Covariates({ d }: { d: ModelDefinition }) {
  const cs = d.covariates ?? [];
  if (cs.length === 0) return <p className="text-sm text-slate-600">The model uses none.</p>;
  return (
    <>
      <table className="w-full text-left text-sm">
        <thead className={head}>
          <tr>
            <th scope="col">Symbol</th>
            <th scope="col">Covariate</th>
            <th scope="col">Range the model was built on</th>
            <th scope="col">Source</th>
          </tr>
        </thead>
        <tbody className={body}>
          {cs.map((c) => (
            <tr key={c.name} className="border-b border-slate-100">
              <td className="font-mono text-xs">{c.name}</td>
              <td>{c.description}</td>
              <td className="whitespace-nowrap">{rangeLabel(c)}</td>
              <td>
                <SourceNote p={c} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-slate-600">
        A patient outside these ranges is an extrapolation: the fit warns, and the estimate leans
        more on the levels than on the model.
      </p>
    </>
  );
}

function Practical({ d }: { d: ModelDefinition }) {
  const p = d.practical;
  if (!p) return <p className="text-sm text-slate-600">Not given.</p>;
  return (
    <>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="text-slate-600">Dose rounding</dt>
        <dd>to {p.doseRoundingMg} mg</dd>
        <dt className="text-slate-600">Maximum infusion rate</dt>
        <dd>
          {p.maxInfusionRateMgPerH === null
            ? 'no limit set in this library'
            : `${p.maxInfusionRateMgPerH} mg/h`}
        </dd>
        <dt className="text-slate-600">Usual intervals</dt>
        <dd>{p.usualIntervalsH.map((h) => `${h} h`).join(', ')}</dd>
        {p.preferredIntervalsH !== undefined && (
          <>
            <dt className="text-slate-600">Ranked first</dt>
            <dd>
              every {p.preferredIntervalsH.map((h) => `${h} h`).join(' or ')}
              {p.usualMaxSingleDoseMg !== undefined &&
                `, single doses up to ${p.usualMaxSingleDoseMg} mg`}
            </dd>
          </>
        )}
        {p.oralLoadingPortionMg !== undefined && (
          <>
            <dt className="text-slate-600">Oral loading</dt>
            <dd>in portions of up to {p.oralLoadingPortionMg} mg, 2 h apart</dd>
          </>
        )}
        {p.defaultInfusionH !== undefined && (
          <>
            <dt className="text-slate-600">Usual infusion time</dt>
            <dd>{p.defaultInfusionH} h</dd>
          </>
        )}
        <dt className="text-slate-600">Assay unit and SI factor</dt>
        <dd>
          {p.assayUnit}; 1 mg/L = {p.siFactor} µmol/L
        </dd>
        {p.saltFactor !== undefined && (
          <>
            <dt className="text-slate-600">Salt factor S</dt>
            <dd>{p.saltFactor}</dd>
          </>
        )}
        <dt className="text-slate-600">Default target</dt>
        <dd>
          {targetLabel(p.target)}
          <div>
            <SourceNote p={p.target} />
          </div>
        </dd>
      </dl>
      {p.sources.length > 0 && (
        <>
          <p className="mt-2 text-xs font-semibold text-slate-700">Sources of these settings</p>
          <ul className="list-disc pl-5 text-xs text-slate-700">
            {p.sources.map((s) => (
              <li key={s}>{s}</li>
            ))}
          </ul>
        </>
      )}
      <p className="mt-1 text-xs text-slate-600">Most of these are site-configurable.</p>
    </>
  );
}

function Versions({ model }: { model: DrugModel }) {
  const all = useLibraryModels({ drug: model.drug, allVersions: true });
  const versions = (all.data?.items ?? [])
    .filter((m) => m.id === model.id)
    .sort((a, b) => b.version - a.version);
  if (versions.length <= 1) return null;
  return (
    <nav aria-label="Versions" className="text-sm">
      Versions:{' '}
      {versions.map((m, i) => (
        <span key={m.version}>
          {i > 0 && ' · '}
          {m.version === model.version ? (
            <strong aria-current="page">v{m.version}</strong>
          ) : (
            <Link className="text-tide-700 underline" to={paths.drugModel.getHref(m.id, m.version)}>
              v{m.version}
            </Link>
          )}
        </span>
      ))}
    </nav>
  );
}

/** One version of a library model: every number with its source, and the admin's new version. */
export function DrugModelScreen() {
  const { modelId = '' } = useParams();
  const [search] = useSearchParams();
  const v = Number(search.get('version'));
  const version = Number.isInteger(v) && v > 0 ? v : undefined;
  const model = useLibraryModel(modelId, version);
  const me = useMe();
  if (model.isPending) return <Loading what="the model" />;
  if (model.isError) return <ErrorMessage error={model.error} what="load the model" />;
  const m = model.data;
  const d = asDefinition(m.definition);
  return (
    <div className="space-y-4">
      <header className="space-y-1">
        <p className="text-sm">
          <Link className="text-tide-700 underline" to={paths.drugModels.getHref()}>
            Drug models
          </Link>
        </p>
        <h1 className="text-xl font-semibold text-tide-900">
          {m.name} <span className="text-base font-normal text-slate-600">v{m.version}</span>
        </h1>
        <p className="text-sm text-slate-700">
          <span className="capitalize">{m.drug}</span> · {structureLabel(d)} · {eliminationLabel(d)}{' '}
          elimination · routes {(d.routes ?? []).join(', ') || '—'} ·{' '}
          <span className="font-mono text-xs">{m.id}</span>
        </p>
        {d.population && <p className="text-sm text-slate-700">Built on: {d.population}</p>}
        <p className="text-xs text-slate-600">
          Stored {new Date(m.createdAt).toLocaleString('en-GB')}
          {m.createdBy ? '' : ' from the built-in library'}
        </p>
        <Versions model={m} />
      </header>
      {anyFromMemory(d) && (
        <p
          role="note"
          className="rounded border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-900"
        >
          Some numbers of this model are marked <FromMemory /> — they were recalled, not read in the
          source, and must be checked against the paper before this model is used for a patient.
        </p>
      )}
      <Panel title="Typical values and covariate relations">
        <Parameters d={d} />
        <p className="mt-1 text-xs text-slate-600">
          In a relation, THETA is the typical value; the covariate symbols are listed below.
        </p>
      </Panel>
      <div className="grid gap-4 xl:grid-cols-2">
        <Panel title="Between-subject variability">
          <Variability d={d} />
        </Panel>
        <Panel title="Residual error">
          <ResidualError d={d} />
        </Panel>
      </div>
      <Panel title="Covariate ranges">
        <Covariates d={d} />
      </Panel>
      <Panel title="Practical settings">
        <Practical d={d} />
        <ResultCaution />
      </Panel>
      <Panel title="References">
        <ul className="list-disc pl-5 text-sm text-slate-700">
          {(d.references ?? [m.source]).map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
        {d.notes && <p className="mt-2 text-sm text-slate-700">Note: {d.notes}</p>}
        <p className="mt-2 text-xs text-slate-600">
          Plausible single dose (entry check): {m.plausibleSingleDoseMg.min}–
          {m.plausibleSingleDoseMg.max} mg
        </p>
      </Panel>
      {me.data?.role === 'admin' && <AddModelVersionForm key={`${m.id}@${m.version}`} base={m} />}
    </div>
  );
}
