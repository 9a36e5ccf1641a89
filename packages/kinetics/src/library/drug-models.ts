import type { DrugModelEntry } from './types';

/**
 * The built-in drug-model library: data only. Every number names its source; `fromMemory: true` marks a
 * value recalled rather than read in the source, to be checked against the paper before clinical use.
 * Units are the engine's (L/h, L, 1/h, mg/h, mg/L). Covariate symbols: WT (total body weight, kg),
 * CRCL (Cockcroft-Gault creatinine clearance, mL/min), HD (1 on intermittent haemodialysis, else 0).
 */

const RYBAK_2020 =
  'Rybak MJ et al. Therapeutic monitoring of vancomycin for serious MRSA infections: a revised consensus guideline. Am J Health-Syst Pharm 2020;77:835-864';
const NICOLAU_1995 =
  'Nicolau DP et al. Experience with a once-daily aminoglycoside program administered to 2,184 adult patients. Antimicrob Agents Chemother 1995;39:650-5';
const BAUER_AMINOGLYCOSIDES =
  'Bauer LA. Applied Clinical Pharmacokinetics, 3rd ed., aminoglycoside chapter';
const AMINOGLYCOSIDE_IIV =
  'Gentamicin in spinal-cord-injured vs able-bodied adults, nonparametric population analysis, Antimicrob Agents Chemother (able-bodied group)';
const GRASELA_1983 =
  'Grasela TH, Sheiner LB, Rambeck B, et al. Steady-state pharmacokinetics of phenytoin from routinely collected patient data. Clin Pharmacokinet 1983;8:355-64';
const PHENYTOIN_TDM_2016 =
  'Phenytoin population model, Ther Drug Monit 2016;38:728-737, Table 2 (PMC5113813)';
const COMMON = 'common practice';

/** Vancomycin, adults: Goti 2018 two-compartment model. */
export const vancomycinGoti2018: DrugModelEntry = {
  id: 'vancomycin-adult-goti-2018',
  drug: 'vancomycin',
  title: 'Vancomycin, hospitalised adults (two-compartment)',
  population: 'Hospitalised adults, with and without intermittent haemodialysis',
  structure: { compartments: 2, elimination: 'linear' },
  routes: ['infusion'],
  parameters: {
    CL: {
      typical: 4.5,
      unit: 'L/h',
      expression: 'THETA * (CRCL / 120)^0.8 * 0.7^HD',
      source:
        'Goti V et al. Ther Drug Monit 2018;40:212-221, Table 2 (typical 4.5 L/h at CrCl 120 mL/min and HD factor 0.7 seen in a secondary summary; CrCl exponent 0.8 from memory)',
      fromMemory: true,
    },
    V1: {
      typical: 58.4,
      unit: 'L',
      expression: 'THETA * (WT / 70) * 0.5^HD',
      source:
        'Goti V et al. Ther Drug Monit 2018;40:212-221, Table 2 (seen in a secondary summary)',
      fromMemory: false,
    },
    Q: {
      typical: 6.5,
      unit: 'L/h',
      source:
        'Goti V et al. Ther Drug Monit 2018;40:212-221 (the summary seen was truncated at "6.x"; 6.5 from memory)',
      fromMemory: true,
    },
    V2: {
      typical: 38.4,
      unit: 'L',
      source:
        'Goti V et al. Ther Drug Monit 2018;40:212-221, Table 2 (seen in a secondary summary)',
      fromMemory: false,
    },
  },
  variability: {
    CL: {
      cvPercent: 40,
      source:
        'placeholder within the 25–40 % range usual for vancomycin CL (common practice); take the value from Goti 2018 Table 2',
      fromMemory: true,
    },
    V1: {
      cvPercent: 35,
      source:
        'placeholder within the 15–35 % range usual for vancomycin V (common practice); take the value from Goti 2018 Table 2',
      fromMemory: true,
    },
  },
  residualError: {
    model: 'combined',
    additive: 1,
    proportional: 0.15,
    source:
      'placeholder (common practice: proportional 10–20 %); take the values from Goti 2018 Table 2',
    fromMemory: true,
  },
  covariates: [
    {
      name: 'CRCL',
      description: 'Cockcroft-Gault creatinine clearance',
      unit: 'mL/min',
      min: 5,
      max: 150,
      source: 'Goti 2018 study population, range from memory',
      fromMemory: true,
    },
    {
      name: 'WT',
      description: 'total body weight',
      unit: 'kg',
      min: 40,
      max: 150,
      source: 'Goti 2018 study population, range from memory',
      fromMemory: true,
    },
    {
      name: 'HD',
      description: 'on intermittent haemodialysis (1) or not (0)',
      unit: '0/1',
      min: 0,
      max: 1,
      source: 'Goti V et al. Ther Drug Monit 2018;40:212-221',
      fromMemory: false,
    },
  ],
  practical: {
    doseRoundingMg: 250,
    maxInfusionRateMgPerH: 1000,
    usualIntervalsH: [8, 12, 24, 36, 48],
    preferredIntervalsH: [12, 24],
    usualMaxSingleDoseMg: 2000,
    defaultInfusionH: 1,
    assayUnit: 'mg/L',
    siFactor: 0.69,
    target: {
      kind: 'auc24',
      low: 400,
      high: 600,
      mic: 1,
      source: `${RYBAK_2020} (AUC24/MIC 400–600 assuming broth-microdilution MIC 1 mg/L)`,
      fromMemory: false,
    },
    sources: [
      'Dose rounding to 250 mg: many hospital protocols (common practice)',
      'Adult maintenance usually every 12 or 24 h, single maintenance doses up to 2000 mg; 8, 36 and 48 h kept for augmented or poor renal function (common practice; site-configurable)',
      `Infusion rate ≤ 1 g/h: ${RYBAK_2020}, haemodialysis summary table (site-configurable)`,
      'SI factor 0.69 µmol/L per mg/L: from molar mass ≈ 1449 g/mol (common practice)',
    ],
  },
  references: [
    'Goti V, Chaturvedula A, Fossler MJ, Mok S, Jacob JT. Hospitalized patients with and without hemodialysis have markedly different vancomycin pharmacokinetics: a population pharmacokinetic model-based analysis. Ther Drug Monit 2018;40:212-221',
  ],
  notes:
    'Between-subject variability and residual error are placeholders until checked against the paper.',
};

/** Extended-interval gentamicin, one compartment with the CrCl-based elimination rate. */
export const gentamicinExtendedInterval: DrugModelEntry = {
  id: 'gentamicin-adult-extended-interval',
  drug: 'gentamicin',
  title: 'Gentamicin, adults, extended-interval dosing (one-compartment)',
  population: 'Adults with stable renal function (CrCl ≥ 20 mL/min)',
  structure: { compartments: 1, elimination: 'linear' },
  routes: ['infusion'],
  parameters: {
    CL: {
      typical: 5.587,
      unit: 'L/h',
      expression: '(0.00293 * CRCL + 0.014) * 0.26 * WT',
      source: `CL = ke·V with ke (1/h) = 0.00293·CrCl + 0.014 (seen on a formula sheet; attribution ${BAUER_AMINOGLYCOSIDES}, from memory) and V = 0.26 L/kg (${BAUER_AMINOGLYCOSIDES}); typical at CrCl 100, 70 kg`,
      fromMemory: true,
    },
    V1: {
      typical: 18.2,
      unit: 'L',
      expression: '0.26 * WT',
      source: `${BAUER_AMINOGLYCOSIDES}: V ≈ 0.26 L/kg; typical at 70 kg`,
      fromMemory: false,
    },
  },
  variability: {
    CL: { cvPercent: 28.2, source: `${AMINOGLYCOSIDE_IIV}: CL CV 28.2 %`, fromMemory: false },
    V1: { cvPercent: 15.8, source: `${AMINOGLYCOSIDE_IIV}: V CV 15.8 %`, fromMemory: false },
  },
  residualError: {
    model: 'combined',
    additive: 0.2,
    proportional: 0.1,
    source:
      'placeholder (common practice: proportional 10–20 % plus a small additive term near the assay limit)',
    fromMemory: false,
  },
  covariates: [
    {
      name: 'CRCL',
      description: 'Cockcroft-Gault creatinine clearance',
      unit: 'mL/min',
      min: 20,
      max: 150,
      source: NICOLAU_1995,
      fromMemory: true,
    },
    {
      name: 'WT',
      description: 'dosing weight',
      unit: 'kg',
      min: 40,
      max: 150,
      source: COMMON,
      fromMemory: false,
    },
  ],
  practical: {
    doseRoundingMg: 20,
    maxInfusionRateMgPerH: null,
    usualIntervalsH: [24, 36, 48],
    defaultInfusionH: 0.5,
    assayUnit: 'mg/L',
    siFactor: 2.09,
    target: {
      kind: 'peak-trough',
      peakOverMic: 10,
      mic: 1,
      troughMax: 1,
      source:
        'Peak/MIC ≥ 10 (Int J Antimicrob Agents 2002 review; Moore RD, Lietman PS, Smith CR. J Infect Dis 1987;155:93, from memory); extended-interval trough < 1 mg/L (common practice)',
      fromMemory: true,
    },
    sources: [
      `Intervals 24/36/48 h by CrCl: ${NICOLAU_1995}`,
      'Dose rounding to 20 mg and 30 min infusion: common practice',
      'SI factor 2.09 µmol/L per mg/L (common practice)',
    ],
  },
  references: [BAUER_AMINOGLYCOSIDES, NICOLAU_1995],
};

/** Extended-interval tobramycin: the same one-compartment relation as gentamicin. */
export const tobramycinExtendedInterval: DrugModelEntry = {
  ...gentamicinExtendedInterval,
  id: 'tobramycin-adult-extended-interval',
  drug: 'tobramycin',
  title: 'Tobramycin, adults, extended-interval dosing (one-compartment)',
  practical: {
    ...gentamicinExtendedInterval.practical,
    siFactor: 2.139,
    sources: [
      `Intervals 24/36/48 h by CrCl: ${NICOLAU_1995}`,
      'Dose rounding to 20 mg and 30 min infusion: common practice',
      'SI factor 2.139 µmol/L per mg/L from molar mass 467.5 g/mol (common practice)',
    ],
  },
  notes:
    'Gentamicin and tobramycin share the textbook V and ke relations (Bauer, aminoglycoside chapter); a tobramycin-specific published model should replace this when one is added.',
};

/** Amikacin, adults, once-daily dosing: one compartment. */
export const amikacinExtendedInterval: DrugModelEntry = {
  id: 'amikacin-adult-extended-interval',
  drug: 'amikacin',
  title: 'Amikacin, adults, once-daily dosing (one-compartment)',
  population: 'Adults with stable renal function (CrCl ≥ 20 mL/min)',
  structure: { compartments: 1, elimination: 'linear' },
  routes: ['infusion'],
  parameters: {
    CL: {
      typical: 4.513,
      unit: 'L/h',
      expression: '(0.00293 * CRCL + 0.014) * 0.21 * WT',
      source: `CL = ke·V with the aminoglycoside ke = 0.00293·CrCl + 0.014 (${BAUER_AMINOGLYCOSIDES}, from memory) and V = 0.21 L/kg (antimicrobe.org aminoglycoside PK table, amikacin with normal renal function); typical at CrCl 100, 70 kg`,
      fromMemory: true,
    },
    V1: {
      typical: 14.7,
      unit: 'L',
      expression: '0.21 * WT',
      source: 'antimicrobe.org aminoglycoside PK table: amikacin Vd 0.21 L/kg; typical at 70 kg',
      fromMemory: false,
    },
  },
  variability: {
    CL: {
      cvPercent: 30,
      source: 'placeholder (common practice, CL CV 25–40 % for aminoglycosides)',
      fromMemory: false,
    },
    V1: {
      cvPercent: 20,
      source: 'placeholder (common practice, V CV 15–35 % for aminoglycosides)',
      fromMemory: false,
    },
  },
  residualError: {
    model: 'combined',
    additive: 0.5,
    proportional: 0.1,
    source: 'placeholder (common practice)',
    fromMemory: false,
  },
  covariates: gentamicinExtendedInterval.covariates,
  practical: {
    doseRoundingMg: 50,
    maxInfusionRateMgPerH: null,
    usualIntervalsH: [24, 36, 48],
    defaultInfusionH: 0.5,
    assayUnit: 'mg/L',
    siFactor: 1.708,
    target: {
      kind: 'peak-trough',
      peakOverMic: 10,
      mic: 4,
      troughMax: 4,
      source:
        'Peak/MIC ≥ 10 (Int J Antimicrob Agents 2002 review abstract); trough < 4–5 mg/L on extended-interval dosing (secondary tool pages; common practice); MIC 4 mg/L assumed (common practice)',
      fromMemory: false,
    },
    sources: [
      'Amikacin 15–20 mg/kg once daily (AAFP review abstract)',
      'Dose rounding to 50 mg: common practice',
      'SI factor 1.708 µmol/L per mg/L (common practice)',
    ],
  },
  references: [BAUER_AMINOGLYCOSIDES, 'antimicrobe.org aminoglycoside pharmacokinetics table'],
};

/** Phenytoin, adults: Michaelis-Menten elimination (Grasela 1983). */
export const phenytoinGrasela1983: DrugModelEntry = {
  id: 'phenytoin-adult-grasela-1983',
  drug: 'phenytoin',
  title: 'Phenytoin, adults (Michaelis-Menten, one-compartment)',
  population:
    '322 patients with routinely collected steady-state levels; typical values for a 70 kg European adult male',
  structure: { compartments: 1, elimination: 'michaelis-menten' },
  routes: ['oral', 'infusion'],
  parameters: {
    Vmax: {
      typical: 415 / 24,
      unit: 'mg/h',
      expression: 'THETA * (WT / 70)^0.6',
      source: `${GRASELA_1983}: Vm 415 mg/day (= 17.29 mg/h) for 70 kg, Vm ∝ weight^0.6 (PubMed abstract)`,
      fromMemory: false,
    },
    Km: {
      typical: 5.7,
      unit: 'mg/L',
      source: `${GRASELA_1983}: Km 5.7 mg/L (PubMed abstract); 43 % lower under 15 y (not modelled here: adults only)`,
      fromMemory: false,
    },
    V1: {
      typical: 49,
      unit: 'L',
      expression: '0.7 * WT',
      source:
        'V ≈ 0.7 L/kg (Winter ME, Basic Clinical Pharmacokinetics; Bauer LA, Applied Clinical Pharmacokinetics, phenytoin chapter — from memory)',
      fromMemory: true,
    },
    ka: {
      typical: 0.3,
      unit: '1/h',
      source: 'placeholder for slow oral absorption (no published source here; common practice)',
      fromMemory: true,
    },
    F: {
      typical: 0.859,
      unit: 'fraction',
      source: `${PHENYTOIN_TDM_2016}: oral F 0.859 (fixed)`,
      fromMemory: false,
    },
  },
  variability: {
    Vmax: {
      cvPercent: 15,
      source: `${GRASELA_1983}: residual IIV of Vm 10–20 % CV (midpoint taken)`,
      fromMemory: false,
    },
    Km: { cvPercent: 50, source: `${GRASELA_1983}: IIV of Km ≈ 50 % CV`, fromMemory: false },
    V1: { cvPercent: 33.9, source: `${PHENYTOIN_TDM_2016}: V IIV 33.9 % CV`, fromMemory: false },
  },
  residualError: {
    model: 'proportional',
    proportional: 0.171,
    source: `${PHENYTOIN_TDM_2016}: proportional residual error 17.1 %`,
    fromMemory: false,
  },
  covariates: [
    {
      name: 'WT',
      description: 'total body weight',
      unit: 'kg',
      min: 40,
      max: 120,
      source: 'adult population (range from memory)',
      fromMemory: true,
    },
  ],
  practical: {
    doseRoundingMg: 50,
    maxInfusionRateMgPerH: 3000,
    usualIntervalsH: [24, 12, 8],
    defaultInfusionH: 0.5,
    assayUnit: 'mg/L',
    siFactor: 3.964,
    saltFactor: 0.92,
    oralLoadingPortionMg: 400,
    target: {
      kind: 'concentration',
      low: 10,
      high: 20,
      source:
        'Total phenytoin 10–20 mg/L (Winter ME, Basic Clinical Pharmacokinetics, from memory; several secondary pages)',
      fromMemory: true,
    },
    sources: [
      'Salt factor 0.92 for phenytoin sodium (pharmacy teaching page; Winter/Bauer) — apply S to the dose before simulating',
      'IV rate ≤ 50 mg/min in adults (product label, from memory)',
      'Dose rounding to 50 mg: common practice (small steps because kinetics are nonlinear)',
      'SI factor 3.964 µmol/L per mg/L (molar mass 252.3 g/mol)',
      'Oral loading doses given in portions of ≤ 400 mg every 2 h: common practice (large single oral doses absorb slowly; from memory, Winter/Bauer phenytoin chapters)',
    ],
  },
  references: [GRASELA_1983, PHENYTOIN_TDM_2016],
  notes:
    'Vmax is in mg/h inside the engine (415 mg/day / 24). Doses of phenytoin sodium must be multiplied by S = 0.92 by the caller.',
};

/** All built-in models, by id. */
export const drugModelLibrary: Readonly<Record<string, DrugModelEntry>> = Object.freeze({
  [vancomycinGoti2018.id]: vancomycinGoti2018,
  [gentamicinExtendedInterval.id]: gentamicinExtendedInterval,
  [tobramycinExtendedInterval.id]: tobramycinExtendedInterval,
  [amikacinExtendedInterval.id]: amikacinExtendedInterval,
  [phenytoinGrasela1983.id]: phenytoinGrasela1983,
});
