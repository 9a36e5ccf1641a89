import type {
  Drug,
  DrugModel,
  DrugModelCreate,
  DrugModelListQuery,
  Page,
} from '@ebbtide/contracts';
import { drugSchema } from '@ebbtide/contracts';
import { validateDrugModel, type DrugModelEntry } from '@ebbtide/kinetics';
import { recordAudit } from '../../data-access/audit';
import { inTransaction, type Conn } from '../../data-access/casework-db';
import {
  findDrugModel,
  insertDrugModel,
  latestDrugModelVersion,
  listDrugModels,
} from '../../data-access/drug-models-repo';
import { AppError, notFound } from '../../lib/app-error';
import { auditActor, invalid, type CaseworkActor } from '../patients/common';

/**
 * Plausible single-dose range per drug, mg, for the dose plausibility check (a unit or decimal
 * slip refuses rather than saves). The engine's practical settings carry no such range yet, so the
 * defaults live here. Vancomycin 250–4500 mg as set by the product; the others are wide adult and
 * paediatric envelopes (practice), site-configurable per model through the library.
 */
export const DEFAULT_PLAUSIBLE_SINGLE_DOSE_MG: Record<Drug, { min: number; max: number }> = {
  vancomycin: { min: 250, max: 4500 },
  gentamicin: { min: 10, max: 1200 },
  tobramycin: { min: 10, max: 1200 },
  amikacin: { min: 50, max: 3000 },
  phenytoin: { min: 25, max: 2000 },
};

/**
 * Validates a model definition with the engine's own validator (`validateDrugModel`), plus the
 * consistency of the definition with the library row that stores it.
 */
export function validateDefinition(
  input: Pick<DrugModelCreate, 'id' | 'drug' | 'definition'>,
): string[] {
  const v = validateDrugModel(input.definition as unknown as DrugModelEntry);
  const problems = v.problems.map((p) => `${p.field}: ${p.message}`);
  if (input.definition.id !== undefined && input.definition.id !== input.id) {
    problems.push(
      `id: the definition's id (${String(input.definition.id)}) differs from ${input.id}`,
    );
  }
  if (input.definition.drug !== input.drug) {
    problems.push(
      `drug: the definition is for ${String(input.definition.drug)}, not ${input.drug}`,
    );
  }
  return problems;
}

export async function browseDrugModels(
  db: Conn,
  query: DrugModelListQuery,
): Promise<Page<DrugModel>> {
  const { items, total } = await listDrugModels(db, query);
  return { items, page: query.page, pageSize: query.pageSize, total };
}

export async function getDrugModel(db: Conn, id: string, version?: number): Promise<DrugModel> {
  const m = await findDrugModel(db, id, version);
  if (!m) throw notFound('Drug model');
  return m;
}

/** Admin: adds a model, or a new version of an existing id (stored versions never change). */
export async function addDrugModel(
  db: Conn,
  actor: CaseworkActor,
  input: DrugModelCreate,
): Promise<DrugModel> {
  if (actor.role !== 'admin')
    throw new AppError('forbidden', 'Only an admin manages the drug-model library', 403);
  const problems = validateDefinition(input);
  if (problems.length) throw invalid({ definition: problems }, 'The model definition is not valid');
  return inTransaction(db, async (trx) => {
    const existing = await findDrugModel(trx, input.id);
    if (existing && existing.drug !== input.drug) {
      throw invalid({ drug: [`model ${input.id} is a ${existing.drug} model`] });
    }
    const version = (await latestDrugModelVersion(trx, input.id)) + 1;
    const created = await insertDrugModel(trx, {
      ...input,
      version,
      createdBy: actor.userId,
    });
    await recordAudit(trx, {
      actor: auditActor(actor),
      action: 'drug-model.create',
      entityType: 'drug-model',
      entityId: `${created.id}@${created.version}`,
      after: created,
    });
    return created;
  });
}

/** What the sync needs of an engine library entry. */
export interface LibraryEntryLike {
  readonly id: string;
  readonly drug: string;
  readonly title: string;
  readonly references: readonly string[];
}

/**
 * Copies every entry of the engine's library (`drugModelLibrary` of @ebbtide/kinetics) into
 * `drug_models` as version 1 when absent (idempotent). Called by the demo seed and the tests.
 */
export async function syncEngineLibrary(
  db: Conn,
  library: Readonly<Record<string, LibraryEntryLike>>,
): Promise<DrugModel[]> {
  const out: DrugModel[] = [];
  for (const entry of Object.values(library)) {
    const drug = drugSchema.safeParse(entry.drug);
    if (!drug.success) continue;
    const existing = await findDrugModel(db, entry.id, 1);
    if (existing) {
      out.push(existing);
      continue;
    }
    out.push(
      await insertDrugModel(db, {
        id: entry.id,
        version: 1,
        drug: drug.data,
        name: entry.title,
        source: entry.references.join('; '),
        definition: JSON.parse(JSON.stringify(entry)) as Record<string, unknown>,
        plausibleSingleDoseMg: DEFAULT_PLAUSIBLE_SINGLE_DOSE_MG[drug.data],
        createdBy: null,
      }).catch(async (error: unknown) => {
        const again = await findDrugModel(db, entry.id, 1);
        if (again) return again;
        throw error;
      }),
    );
  }
  return out;
}
