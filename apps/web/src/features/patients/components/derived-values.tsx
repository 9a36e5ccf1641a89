import type { DerivedValues } from '@ebbtide/contracts';
import { Disclosure } from '../../../components/ui/disclosure';
import { ResultCaution } from '../../../components/ui/result-caution';
import { Empty, ErrorMessage, Loading } from '../../../components/ui/states';
import { Warnings } from '../../../components/ui/warnings';
import { formatClinicalTime, formatNumber } from '../../../lib/clinical-format';
import { useDerivedValues } from '../api/get-derived-values';

type Value = NonNullable<DerivedValues['idealBodyWeight']>;

/** UCUM codes as people read them. */
const displayUnit = (ucum: string) =>
  ucum
    .replace('{1.73_m2}', '1.73 m²')
    .replace(/\bm2\b/, 'm²')
    .replace('umol', 'µmol');

const WEIGHT_USED = {
  total: 'total body weight',
  ideal: 'ideal body weight',
  adjusted: 'adjusted body weight',
};

function DerivedCell({
  label,
  value,
  extra,
}: {
  label: string;
  value: Value | null;
  extra?: string;
}) {
  return (
    <div className="rounded border border-slate-200 p-2">
      <dt className="text-xs font-semibold text-slate-600">{label}</dt>
      <dd>
        {value ? (
          <>
            <span className="text-base font-semibold text-slate-900">
              {formatNumber(value.value, 1)} {displayUnit(value.unit)}
            </span>
            {extra && <div className="text-xs text-slate-600">{extra}</div>}
            <Disclosure summary="Formula">
              <p className="font-mono">{value.formula}</p>
              <p className="mt-1">Source: {value.source}</p>
            </Disclosure>
          </>
        ) : (
          <span className="text-sm text-slate-500">not enough covariates</span>
        )}
      </dd>
    </div>
  );
}

export function DerivedValuesPanel({ patientId }: { patientId: string }) {
  const derived = useDerivedValues(patientId);
  if (derived.isPending) return <Loading what="derived values" />;
  if (derived.isError) return <ErrorMessage error={derived.error} what="compute derived values" />;
  const d = derived.data;
  const crcl = d.creatinineClearance;
  const i = d.inputs;
  const noInputs = i.weightKg === null && i.serumCreatinineUmolL === null && i.heightCm === null;
  return (
    <div>
      {noInputs && <Empty>Add weight, height and serum creatinine to see derived values.</Empty>}
      <p className="mb-2 text-xs text-slate-600">
        From: {i.ageYears} y, {i.sex}
        {i.weightKg !== null &&
          `; weight ${formatNumber(i.weightKg, 1)} kg (${i.weightSource ?? 'source unknown'}, ${formatClinicalTime({ at: i.weightObservedAt, hour: i.weightObservedHour })})`}
        {i.heightCm !== null && `; height ${formatNumber(i.heightCm, 0)} cm`}
        {i.serumCreatinineUmolL !== null &&
          `; SCr ${formatNumber(i.serumCreatinineUmolL, 0)} µmol/L (${formatNumber(i.serumCreatinineMgDl ?? 0, 2)} mg/dL, ${formatClinicalTime({ at: i.serumCreatinineObservedAt, hour: i.serumCreatinineObservedHour })})`}
        {i.dialysisStatus && i.dialysisStatus !== 'none' && `; ${i.dialysisStatus}`}
      </p>
      <dl className="grid grid-cols-2 gap-2 md:grid-cols-3 xl:grid-cols-6">
        <DerivedCell
          label="Creatinine clearance"
          value={crcl}
          {...(crcl
            ? { extra: `with ${WEIGHT_USED[crcl.weightUsed]} ${formatNumber(crcl.weightKg, 1)} kg` }
            : {})}
        />
        <DerivedCell label="Ideal body weight" value={d.idealBodyWeight} />
        <DerivedCell label="Adjusted body weight" value={d.adjustedBodyWeight} />
        <DerivedCell label="Lean body weight" value={d.leanBodyWeight} />
        <DerivedCell label="Body surface area" value={d.bodySurfaceArea} />
        <DerivedCell label="eGFR" value={d.egfr} extra="normalised to 1.73 m²: not a CrCl" />
      </dl>
      <Warnings warnings={d.warnings} />
      <ResultCaution />
    </div>
  );
}
