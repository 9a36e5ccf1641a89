import type { DerivedValues, Warning } from '@ebbtide/contracts';
import {
  adjustedBodyWeight,
  bsaMosteller,
  cockcroftGault,
  creatinineMgDlFromUmolL,
  egfrBedsideSchwartz,
  egfrCkdEpi2021,
  idealBodyWeightDevine,
  leanBodyWeightJanmahasatian,
} from '@ebbtide/kinetics';
import type { Conn } from '../../data-access/casework-db';
import { covariatesOfPatient, type CovariateRecord } from '../../data-access/covariates-repo';
import type { PatientRecord } from '../../data-access/patients-repo';
import { fmt, type CaseworkActor } from '../patients/common';
import { requirePatient, toPatientDto } from '../patients/patients';

/** Above this ratio of total to ideal body weight, Cockcroft-Gault uses adjusted weight (common practice; a local-protocol choice). */
export const ADJUSTED_WEIGHT_TRIGGER = 1.2;
/** A weight older than this is flagged as possibly stale (practice). */
export const STALE_WEIGHT_DAYS = 7;
/** SCr rise or fall treated as unstable renal function. Source: from memory: KDIGO 2012 AKI definition (≥ 26.5 µmol/L (0.3 mg/dL) within 48 h). */
export const UNSTABLE_SCR_UMOL_L = 26.5;
export const UNSTABLE_SCR_WINDOW_H = 48;

const timeOf = (c: CovariateRecord, refMs: number): number =>
  c.observedAt ? (Date.parse(c.observedAt) - refMs) / 3_600_000 : (c.observedHour ?? 0);

/** Warns when two creatinine values within 48 h differ by more than 26.5 µmol/L. */
export function renalStabilityWarnings(covariates: CovariateRecord[]): Warning[] {
  const scr = covariates.filter((c) => c.kind === 'serum-creatinine' && c.canonicalValue !== null);
  const ref = 0;
  for (let i = 0; i < scr.length; i++) {
    for (let j = i + 1; j < scr.length; j++) {
      const a = scr[i] as CovariateRecord;
      const b = scr[j] as CovariateRecord;
      const dt = Math.abs(timeOf(b, ref) - timeOf(a, ref));
      const dv = Math.abs((b.canonicalValue as number) - (a.canonicalValue as number));
      if (dt <= UNSTABLE_SCR_WINDOW_H && dv > UNSTABLE_SCR_UMOL_L) {
        return [
          {
            code: 'unstable-renal-function',
            message: `Serum creatinine changed by ${fmt(dv)} µmol/L (${fmt(creatinineMgDlFromUmolL(dv), 2)} mg/dL) within ${fmt(dt)} h: renal function is unstable and predictions based on it are unreliable (from memory: KDIGO 2012, > 26.5 µmol/L (0.3 mg/dL) within 48 h).`,
          },
        ];
      }
    }
  }
  return [];
}

const latest = (covs: CovariateRecord[], kind: CovariateRecord['kind']) => {
  const list = covs.filter((c) => c.kind === kind);
  return list[list.length - 1];
};

/** The derived values of a patient from their latest covariates, each with its formula and source. */
export function computeDerived(
  patient: PatientRecord,
  covariates: CovariateRecord[],
  now = new Date(),
): DerivedValues {
  const p = toPatientDto(patient, now);
  const weight = latest(covariates, 'weight');
  const height = latest(covariates, 'height');
  const scr = latest(covariates, 'serum-creatinine');
  const dialysis = latest(covariates, 'dialysis');
  const warnings: Warning[] = [...renalStabilityWarnings(covariates)];
  const tbw = weight?.canonicalValue ?? null;
  const hcm = height?.canonicalValue ?? null;
  const scrUmol = scr?.canonicalValue ?? null;
  const scrMgDl = scrUmol === null ? null : creatinineMgDlFromUmolL(scrUmol);
  const safe = <T>(f: () => T): T | null => {
    try {
      return f();
    } catch (error) {
      warnings.push({
        code: 'not-computed',
        message: error instanceof Error ? error.message : String(error),
      });
      return null;
    }
  };
  const ibw = hcm !== null && hcm >= 152.4 ? safe(() => idealBodyWeightDevine(hcm, p.sex)) : null;
  if (hcm !== null && hcm < 152.4) {
    warnings.push({
      code: 'ibw-not-defined',
      message: 'Devine IBW is not defined below 60 in (152.4 cm); total body weight is used.',
    });
  }
  const adj = ibw !== null && tbw !== null ? safe(() => adjustedBodyWeight(ibw, tbw)) : null;
  const lbw =
    tbw !== null && hcm !== null && p.ageYears >= 18
      ? safe(() => leanBodyWeightJanmahasatian(tbw, hcm, p.sex))
      : null;
  const bsa = tbw !== null && hcm !== null ? safe(() => bsaMosteller(hcm, tbw)) : null;

  let crcl: DerivedValues['creatinineClearance'] = null;
  if (tbw !== null && scrMgDl !== null && p.ageYears >= 18) {
    const useAdjusted = ibw !== null && adj !== null && tbw > ADJUSTED_WEIGHT_TRIGGER * ibw;
    const weightKg = useAdjusted ? (adj as number) : tbw;
    const value = safe(() =>
      cockcroftGault({
        ageYears: p.ageYears,
        sex: p.sex,
        weightKg: tbw,
        heightCm: hcm ?? undefined,
        serumCreatinineMgDl: scrMgDl,
        weightBasis: useAdjusted ? 'adjusted' : 'actual',
      }),
    );
    if (value !== null) {
      crcl = {
        value,
        unit: 'mL/min',
        weightUsed: useAdjusted ? 'adjusted' : 'total',
        weightKg,
        formula: `CrCl = (140 − ${p.ageYears} y) × ${fmt(weightKg)} kg ${useAdjusted ? 'adjusted' : 'total'} body weight / (72 × ${fmt(scrMgDl, 3)} mg/dL)${p.sex === 'female' ? ' × 0.85' : ''} = ${fmt(value)} mL/min`,
        source: 'Cockcroft DW, Gault MH. Nephron 1976;16:31-41',
      };
    }
  } else if (p.ageYears < 18) {
    warnings.push({
      code: 'paediatric',
      message: 'Cockcroft-Gault is not used under 18 years; see the bedside Schwartz eGFR.',
    });
  }
  if (dialysis?.dialysisStatus && dialysis.dialysisStatus !== 'none') {
    warnings.push({
      code: 'on-dialysis',
      message: `The patient is on ${dialysis.dialysisStatus}: creatinine-based clearance does not describe drug clearance.`,
    });
  }
  if (
    weight?.observedAt &&
    now.getTime() - Date.parse(weight.observedAt) > STALE_WEIGHT_DAYS * 86_400_000
  ) {
    warnings.push({
      code: 'stale-weight',
      message: `The latest weight was recorded more than ${STALE_WEIGHT_DAYS} days ago.`,
    });
  }
  if (weight?.weightSource && weight.weightSource !== 'measured') {
    warnings.push({
      code: 'weight-not-measured',
      message: `The latest weight is ${weight.weightSource}, not measured.`,
    });
  }

  let egfr: DerivedValues['egfr'] = null;
  if (scrMgDl !== null && p.ageYears >= 18) {
    const v = safe(() =>
      egfrCkdEpi2021({ serumCreatinineMgDl: scrMgDl, ageYears: p.ageYears, sex: p.sex }),
    );
    if (v !== null) {
      egfr = {
        value: v,
        unit: 'mL/min/{1.73_m2}',
        formula: `CKD-EPI 2021 (race-free): 142 × min(SCr/κ, 1)^α × max(SCr/κ, 1)^−1.200 × 0.9938^age${p.sex === 'female' ? ' × 1.012' : ''}; normalised to 1.73 m², not a CrCl`,
        source: 'Inker LA et al. N Engl J Med 2021;385:1737-49',
      };
    }
  } else if (scrMgDl !== null && hcm !== null && p.ageYears >= 1) {
    const v = safe(() =>
      egfrBedsideSchwartz({ heightCm: hcm, serumCreatinineMgDl: scrMgDl, ageYears: p.ageYears }),
    );
    if (v !== null) {
      egfr = {
        value: v,
        unit: 'mL/min/{1.73_m2}',
        formula: `bedside Schwartz: 0.413 × ${fmt(hcm)} cm / ${fmt(scrMgDl, 3)} mg/dL`,
        source: 'Schwartz GJ et al. J Am Soc Nephrol 2009;20:629-37',
      };
    }
  }
  const kg = (value: number | null, formula: string, source: string) =>
    value === null ? null : { value, unit: 'kg', formula, source };
  return {
    patientId: patient.id,
    inputs: {
      ageYears: p.ageYears,
      sex: p.sex,
      weightKg: tbw,
      weightObservedAt: weight?.observedAt ?? null,
      weightObservedHour: weight?.observedHour ?? null,
      weightSource: weight?.weightSource ?? null,
      heightCm: hcm,
      serumCreatinineUmolL: scrUmol,
      serumCreatinineMgDl: scrMgDl,
      serumCreatinineObservedAt: scr?.observedAt ?? null,
      serumCreatinineObservedHour: scr?.observedHour ?? null,
      dialysisStatus: dialysis?.dialysisStatus ?? null,
    },
    creatinineClearance: crcl,
    idealBodyWeight: kg(
      ibw,
      `Devine: ${p.sex === 'male' ? '50' : '45.5'} kg + 2.3 kg per inch over 60 in`,
      'Devine BJ. Drug Intell Clin Pharm 1974;8:650-655',
    ),
    adjustedBodyWeight: kg(
      adj,
      'AdjBW = IBW + 0.4 × (TBW − IBW)',
      'widely taught 0.4 factor (from memory: Bauer LA, Applied Clinical Pharmacokinetics)',
    ),
    leanBodyWeight: kg(
      lbw,
      'Janmahasatian lean body weight',
      'Janmahasatian S et al. Clin Pharmacokinet 2005;44:1051-65',
    ),
    bodySurfaceArea:
      bsa === null
        ? null
        : {
            value: bsa,
            unit: 'm2',
            formula: 'Mosteller: √(height cm × weight kg / 3600)',
            source: 'Mosteller RD. N Engl J Med 1987;317:1098',
          },
    egfr,
    warnings,
  };
}

export async function derivedValuesOf(
  db: Conn,
  actor: CaseworkActor,
  patientId: string,
): Promise<DerivedValues> {
  const patient = await requirePatient(db, actor, patientId);
  return computeDerived(patient, await covariatesOfPatient(db, patient.id));
}
